/**
 * Pair difficulty: the InfoNCE loss of fixed embeddings over batches of K candidates, and its reading.
 *
 * InfoNCE (van den Oord, Li, Vinyals, "Representation Learning with Contrastive Predictive Coding", 2018,
 * Eq. 4 [V2]): among K candidates, 1 positive and K−1 negatives, the loss is −log(e^{s⁺/τ} / Σ_j e^{s_j/τ}), here with
 * s the cosine similarity and τ the temperature (0.07 by default, the `--nce-t` / `--nce_t` default of Wu et al.
 * 2018 and of the Contrastive Multiview Coding code). The mutual information between the two views is at least
 * log K − loss [V2], so that bound is reported beside log K.
 * Batches: pairs are shuffled with a seed and cut into batches of K; in a batch each pair's other K−1 partners are
 * its negatives (in-batch negatives), and the loss is taken both ways (a→b and b→a) and averaged, as CMC sums
 * both directions of a view pair [M]. Leftover pairs that do not fill a batch are not used.
 * Reading: bound close to log K means the views are matched trivially and teach little; close to 0 means the
 * views share almost nothing (for this fixed embedding); in between they carry a useful, learnable signal.
 * The bound can come out below 0: for unrelated views the expected loss is at least log K, and at a low τ the
 * spread of chance similarities raises it further. Such a bound says nothing beyond "unrelated" and is reported
 * as computed, not clamped, so the number stays reproducible.
 */

import { mulberry32, shuffleInPlace } from './seeded-random';

export const DEFAULT_TEMPERATURE = 0.07;
/** Bound at or above this share of log K reads as trivial, at or below the lower one as unrelated. */
export const TRIVIAL_BOUND_SHARE = 0.9;
export const UNRELATED_BOUND_SHARE = 0.1;

const DEFAULT_SEED = 1;
const MIN_K = 2;

export type DifficultyReading = 'trivial' | 'informative' | 'unrelated';

export interface PairDifficulty {
  k: number;
  temperature: number;
  batches: number;
  /** Anchors scored, counting both directions. */
  anchors: number;
  meanLoss: number;
  logK: number;
  /** log K − mean loss, a lower bound on the information the views share (nats). */
  bound: number;
  reading: DifficultyReading;
  message: string;
}

export interface PairDifficultyOptions {
  temperature?: number;
  seed?: number;
}

/**
 * InfoNCE loss of one anchor: −log softmax(scores/τ)[positiveIndex], computed stably. The largest term is
 * factored out and the others summed through log1p, so a uniform scorer gives exactly log K and a near-perfect
 * one keeps its tiny loss accurate.
 */
export function infoNceLoss(
  scores: ArrayLike<number>,
  positiveIndex: number,
  temperature: number = DEFAULT_TEMPERATURE,
): number {
  if (scores.length < 1 || positiveIndex < 0 || positiveIndex >= scores.length) {
    throw new RangeError(`positive index ${positiveIndex} is outside ${scores.length} scores`);
  }
  if (!(temperature > 0)) throw new RangeError(`temperature must be positive, got ${temperature}`);
  let top = 0;
  for (let j = 1; j < scores.length; j += 1) if (scores[j] > scores[top]) top = j;
  const max = scores[top] / temperature;
  let rest = 0;
  for (let j = 0; j < scores.length; j += 1) if (j !== top) rest += Math.exp(scores[j] / temperature - max);
  return Math.log1p(rest) - (scores[positiveIndex] / temperature - max);
}

/** Cosine similarity; 0 when either vector is zero. */
export function cosineSimilarity(a: Float32Array, b: Float32Array): number {
  if (a.length !== b.length) throw new RangeError(`vectors differ in length: ${a.length} and ${b.length}`);
  let dot = 0;
  let na = 0;
  let nb = 0;
  for (let i = 0; i < a.length; i += 1) {
    dot += a[i] * b[i];
    na += a[i] * a[i];
    nb += b[i] * b[i];
  }
  return na > 0 && nb > 0 ? dot / Math.sqrt(na * nb) : 0;
}

/** The report for one pair kind at one K, or null when there are fewer than K pairs. */
export function pairDifficulty(
  viewsA: readonly Float32Array[],
  viewsB: readonly Float32Array[],
  k: number,
  options: PairDifficultyOptions = {},
): PairDifficulty | null {
  const temperature = options.temperature ?? DEFAULT_TEMPERATURE;
  if (viewsA.length !== viewsB.length) throw new RangeError('each pair needs both views');
  if (!Number.isInteger(k) || k < MIN_K) throw new RangeError(`K must be an integer ≥ ${MIN_K}, got ${k}`);
  const batches = Math.floor(viewsA.length / k);
  if (batches === 0) return null;
  const order = shuffleInPlace([...viewsA.keys()], mulberry32(options.seed ?? DEFAULT_SEED));
  let total = 0;
  const similarity = new Float64Array(k * k);
  const row = new Float64Array(k);
  const column = new Float64Array(k);
  for (let batch = 0; batch < batches; batch += 1) {
    const members = order.slice(batch * k, (batch + 1) * k);
    members.forEach((ia, i) =>
      members.forEach((ib, j) => {
        similarity[i * k + j] = cosineSimilarity(viewsA[ia], viewsB[ib]);
      }),
    );
    for (let i = 0; i < k; i += 1) {
      for (let j = 0; j < k; j += 1) {
        row[j] = similarity[i * k + j];
        column[j] = similarity[j * k + i];
      }
      total += infoNceLoss(row, i, temperature) + infoNceLoss(column, i, temperature);
    }
  }
  const anchors = 2 * batches * k;
  const meanLoss = total / anchors;
  const logK = Math.log(k);
  const bound = logK - meanLoss;
  return { k, temperature, batches, anchors, meanLoss, logK, bound, ...readDifficulty(bound, logK) };
}

/** Plain-language reading of a bound against log K. */
export function readDifficulty(bound: number, logK: number): { reading: DifficultyReading; message: string } {
  const share = bound / logK;
  if (share >= TRIVIAL_BOUND_SHARE) {
    return { reading: 'trivial', message: 'The views are matched almost trivially; these pairs teach little.' };
  }
  if (share <= UNRELATED_BOUND_SHARE) {
    return { reading: 'unrelated', message: 'The views share almost nothing a fixed embedding can see.' };
  }
  return { reading: 'informative', message: 'The views share some structure but are not trivially matched.' };
}
