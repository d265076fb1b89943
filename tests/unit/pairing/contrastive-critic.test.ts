import { describe, expect, it } from 'vitest';
import { DEFAULT_CRITIC, trainCritic, type CriticOptions } from '../../../shared/pairing/contrastive-critic';
import { criticBound, type CriticBound } from '../../../shared/pairing/critic-bound';
import { mulberry32, standardNormal } from '../../../shared/pairing/seeded-random';

/**
 * Checks of the trained critic against known mutual information. For x ~ N(0, I_d) and y = ρx + √(1 − ρ²)ε with
 * ε ~ N(0, I_d), each of the d coordinate pairs is a bivariate normal with correlation ρ, so
 * I(x; y) = −(d/2)·ln(1 − ρ²) nats (Cover & Thomas, "Elements of Information Theory", 2006, Example 8.5.1, for
 * one pair, and independence across coordinates [M]; the formula is the one the issue states).
 * InfoNCE over K candidates is a lower bound on I that can never exceed log K (van den Oord et al. 2018, Eq. 4
 * [V2]; Poole et al., "On Variational Bounds of Mutual Information", 2019 [M]), so a good critic approaches
 * min(I, log K) from below.
 * The critic can represent the optimal score here: log p(y|x)/p(y) = ρ/(1 − ρ²)·x·y − ρ²/(2(1 − ρ²))·(‖x‖² + ‖y‖²)
 * + const [C: from the Gaussian densities], and the encoders read [x, ‖x‖²/d, 1], so g(x)·h(y) with
 * g = [a·x, −c‖x‖²/d, 1], h = [a·y, 1, −c‖y‖²/d] is that score (embedDims ≥ d + 2).
 */

interface Sample {
  a: Float32Array[];
  b: Float32Array[];
}

function correlatedGaussians(count: number, d: number, rho: number, seed: number): Sample {
  const random = mulberry32(seed);
  const sample: Sample = { a: [], b: [] };
  const noise = Math.sqrt(1 - rho * rho);
  for (let n = 0; n < count; n += 1) {
    const x = Float32Array.from({ length: d }, () => standardNormal(random));
    sample.a.push(x);
    sample.b.push(x.map((value) => rho * value + noise * standardNormal(random)));
  }
  return sample;
}

const trueMi = (d: number, rho: number) => -(d / 2) * Math.log(1 - rho * rho);
const KS = [16, 64, 256];
const TEMPERATURE = 0.07;
const options = (seed: number): CriticOptions => ({ ...DEFAULT_CRITIC, tied: false, temperature: TEMPERATURE, seed });

const trained = new Map<string, CriticBound[]>();

/** Trains on 2048 pairs and returns the held-out bound at each K over 1024 unseen pairs (once per case). */
function heldOutBounds(d: number, rho: number): CriticBound[] {
  const key = `${d}:${rho}`;
  if (!trained.has(key)) trained.set(key, trainAndMeasure(d, rho));
  return trained.get(key)!;
}

function trainAndMeasure(d: number, rho: number): CriticBound[] {
  const train = correlatedGaussians(2048, d, rho, 11);
  const heldOut = correlatedGaussians(1024, d, rho, 12);
  // Every pair its own group: the stopping pairs are drawn pair by pair, as for one long clip.
  const { critic } = trainCritic(
    train.a,
    train.b,
    train.a.map((_, i) => i),
    options(13),
  );
  return KS.map((k) => criticBound(critic, heldOut.a, heldOut.b, k, 14)!);
}

describe('trained critic on correlated Gaussians (known mutual information)', () => {
  // d = 8, ρ = 0.45: I = 0.905 nats, at most half of log K for K = 16 (1.386), 64 and 256.
  const low = { d: 8, rho: 0.45 };
  // d = 16, ρ = 0.9: I = 13.29 nats, above log 256 = 5.55.
  const high = { d: 16, rho: 0.9 };

  it('never exceeds log K on held-out pairs, in either case', () => {
    for (const { d, rho } of [low, high]) {
      for (const result of heldOutBounds(d, rho)) expect(result.bound).toBeLessThanOrEqual(result.logK);
    }
  });

  it('is within 20 % of the true value where the true value is at most half of log K', () => {
    const mi = trueMi(low.d, low.rho);
    expect(mi).toBeCloseTo(0.9052, 3);
    for (const result of heldOutBounds(low.d, low.rho)) {
      expect(mi).toBeLessThanOrEqual(result.logK / 2);
      expect(result.bound).toBeGreaterThan(0.8 * mi);
      expect(result.bound).toBeLessThan(1.2 * mi);
    }
  });

  it('rises with K where the true value is above log K, staying close to log K', () => {
    expect(trueMi(high.d, high.rho)).toBeGreaterThan(Math.log(256));
    const results = heldOutBounds(high.d, high.rho);
    for (let i = 1; i < results.length; i += 1) expect(results[i]!.bound).toBeGreaterThan(results[i - 1]!.bound);
    // From below, within a tenth of log K: the bound saturates at log K when I ≫ log K.
    for (const result of results) expect(result.bound).toBeGreaterThan(0.9 * result.logK);
  });

  it('gives the same critic and the same figures for the same inputs and seed', () => {
    const sample = correlatedGaussians(300, 6, 0.6, 21);
    const groups = sample.a.map((_, i) => i % 5);
    const first = trainCritic(sample.a, sample.b, groups, options(3));
    const second = trainCritic(sample.a, sample.b, groups, options(3));
    expect(second.critic.wa).toEqual(first.critic.wa);
    expect(second.curve).toEqual(first.curve);
    expect(criticBound(second.critic, sample.a, sample.b, 16, 2)).toEqual(
      criticBound(first.critic, sample.a, sample.b, 16, 2),
    );
    const other = trainCritic(sample.a, sample.b, groups, options(4));
    expect(other.critic.wa).not.toEqual(first.critic.wa);
  });

  it('trains one matrix for both views when tied', () => {
    const sample = correlatedGaussians(200, 6, 0.6, 22);
    const tied = trainCritic(
      sample.a,
      sample.b,
      sample.a.map((_, i) => i % 4),
      { ...options(5), tied: true },
    );
    expect(tied.critic.wb).toEqual(tied.critic.wa);
    const free = trainCritic(
      sample.a,
      sample.b,
      sample.a.map((_, i) => i % 4),
      options(5),
    );
    expect(free.critic.wb).not.toEqual(free.critic.wa);
  });

  it('refuses too few pairs and mismatched inputs with a clear message', () => {
    const sample = correlatedGaussians(3, 4, 0.5, 1);
    expect(() => trainCritic(sample.a, sample.b, [0, 1, 2], options(1))).toThrow(/at least 4 pairs/);
    expect(() => trainCritic(sample.a, sample.b.slice(1), [0, 1, 2], options(1))).toThrow(/both views/);
    expect(() => trainCritic([], [], [], options(1))).toThrow(/at least 4 pairs/);
  });
});
