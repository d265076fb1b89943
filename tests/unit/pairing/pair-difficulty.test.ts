import { describe, expect, it } from 'vitest';
import {
  cosineSimilarity,
  DEFAULT_TEMPERATURE,
  infoNceLoss,
  pairDifficulty,
  readDifficulty,
} from '../../../shared/pairing/pair-difficulty';
import { mulberry32, standardNormal } from '../../../shared/pairing/seeded-random';

/** Unit vector along axis `i` of `dims`: pairs built from these have positive cosine 1, negatives 0. */
function axis(i: number, dims: number): Float32Array {
  const v = new Float32Array(dims);
  v[i] = 1;
  return v;
}

function randomUnit(dims: number, random: () => number): Float32Array {
  const v = Float32Array.from({ length: dims }, () => standardNormal(random));
  const n = Math.sqrt(v.reduce((s, x) => s + x * x, 0));
  return v.map((x) => x / n);
}

describe('InfoNCE loss', () => {
  it('defaults to τ = 0.07', () => {
    // lemniscate.pytorch `--nce-t` and CMC `train_CMC.py --nce_t` default 0.07 (CHECK-VALUES §7 [V, code]).
    expect(DEFAULT_TEMPERATURE).toBe(0.07);
  });

  it.each([
    // Uniform scorer: all K scores equal gives exactly log K (CHECK-VALUES §7 [C]).
    [2, 0.6931471805599453],
    [256, 5.545177444479562],
    [4096, 8.317766166719343],
    [65536, 11.090354888959125],
  ])('gives exactly log K for a uniform scorer, K = %i', (k, logK) => {
    const scores = new Float64Array(k).fill(0.3);
    expect(infoNceLoss(scores, 0)).toBe(logK);
    expect(infoNceLoss(scores, k - 1, 0.5)).toBe(logK);
  });

  it.each([
    // Perfect separation, positive cosine 1 and negatives 0 at τ = 0.07: log(1 + (K − 1)e^(−1/0.07))
    // (CHECK-VALUES §7 [C]).
    [2, 6.2487e-7],
    [256, 1.5933e-4],
  ])('gives log(1 + (K − 1)e^(−1/τ)) for perfect separation, K = %i', (k, expected) => {
    const scores = new Float64Array(k);
    scores[3 % k] = 1;
    const loss = infoNceLoss(scores, 3 % k, 0.07);
    expect(Math.abs(loss - expected) / expected).toBeLessThan(1e-4);
    expect(loss).toBeCloseTo(Math.log1p((k - 1) * Math.exp(-1 / 0.07)), 15);
  });

  it('refuses a positive outside the scores and a non-positive temperature', () => {
    expect(() => infoNceLoss([0, 1], 2)).toThrow(RangeError);
    expect(() => infoNceLoss([0, 1], 0, 0)).toThrow(RangeError);
  });

  it('measures cosine similarity, 0 against a zero vector', () => {
    expect(cosineSimilarity(Float32Array.from([1, 0]), Float32Array.from([1, 1]))).toBeCloseTo(Math.SQRT1_2, 7);
    expect(cosineSimilarity(Float32Array.from([0, 0]), Float32Array.from([1, 1]))).toBe(0);
  });
});

describe('pair difficulty over batches', () => {
  it('reproduces the perfect-separation loss with orthogonal pairs and reads them as trivial', () => {
    const k = 16;
    const views = Array.from({ length: 3 * k }, (_, i) => axis(i, 3 * k));
    const report = pairDifficulty(views, views, k)!;
    expect(report.batches).toBe(3);
    expect(report.anchors).toBe(2 * 3 * k);
    expect(report.meanLoss).toBeCloseTo(Math.log1p((k - 1) * Math.exp(-1 / 0.07)), 12);
    expect(report.bound).toBeCloseTo(Math.log(k) - report.meanLoss, 12);
    expect(report.reading).toBe('trivial');
  });

  it('raises the bound with K for well separated pairs', () => {
    // The bound log K − loss tightens (grows) with K when pairs are well separated (CHECK-VALUES §7 [V2]).
    const random = mulberry32(5);
    const a = Array.from({ length: 512 }, () => randomUnit(64, random));
    const b = a.map((v) => {
      const noisy = v.map((x) => x + 0.05 * standardNormal(random));
      const n = Math.sqrt(noisy.reduce((s, x) => s + x * x, 0));
      return noisy.map((x) => x / n);
    });
    const bounds = [16, 64, 256].map((k) => pairDifficulty(a, b, k)!.bound);
    expect(bounds[1]).toBeGreaterThan(bounds[0]);
    expect(bounds[2]).toBeGreaterThan(bounds[1]);
  });

  it('reads unrelated views as sharing almost nothing, with a bound at or below 0', () => {
    // For independent views the positive score is just another draw, and log-sum-exp ≥ log K + mean score
    // (Jensen), so the expected loss is at least log K and the bound at most 0 [C]. At τ = 0.07 the spread of
    // random cosines (σ ≈ 1/√64) pushes it well below 0: roughly −σ²/(2τ²) ≈ −1.6 [C, Gaussian approximation].
    const random = mulberry32(8);
    const a = Array.from({ length: 256 }, () => randomUnit(64, random));
    const b = Array.from({ length: 256 }, () => randomUnit(64, random));
    const report = pairDifficulty(a, b, 64)!;
    expect(report.bound).toBeLessThan(0);
    expect(report.reading).toBe('unrelated');
  });

  it('is deterministic for a seed and returns null with fewer pairs than K', () => {
    const random = mulberry32(2);
    const a = Array.from({ length: 40 }, () => randomUnit(16, random));
    const b = a.map((v) => v.map((x, i) => x + (i % 3) * 0.1));
    expect(pairDifficulty(a, b, 16, { seed: 3 })).toEqual(pairDifficulty(a, b, 16, { seed: 3 }));
    expect(pairDifficulty(a.slice(0, 15), b.slice(0, 15), 16)).toBeNull();
    expect(() => pairDifficulty(a, b, 1)).toThrow(RangeError);
  });

  it('reads the bound as a share of log K', () => {
    const logK = Math.log(64);
    expect(readDifficulty(0.95 * logK, logK).reading).toBe('trivial');
    expect(readDifficulty(0.5 * logK, logK).reading).toBe('informative');
    expect(readDifficulty(0.05 * logK, logK).reading).toBe('unrelated');
  });
});
