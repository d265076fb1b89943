/**
 * Clustering moment descriptors: standardise each dimension (z-scores, so colour in L* units and histogram shares
 * weigh alike: common practice before k-means), choose k by the silhouette of a sample when none is given, then
 * run the restarts on the whole set. Each run (one restart, or one candidate k) is a task the caller may send to
 * a thread; the result depends only on the points and the options, never on how the tasks were spread.
 */
import { mulberry32, shuffleInPlace } from '../../shared/pairing/seeded-random';
import { SUGGESTED_K_RANGE } from '../../shared/schemas/diversity';
import type { SilhouetteOfK } from '../../shared/types/diversity';
import { kMeansRestart, restartSeed } from './kmeans';
import { silhouetteScore } from './silhouette';

export interface KMeansRunTask {
  kind: 'kmeans-run';
  points: Float64Array;
  dims: number;
  k: number;
  seed: number;
  /** Also score the result's silhouette (a sample: O(n²)). */
  withSilhouette: boolean;
}

export interface KMeansRunOutcome {
  centres: Float64Array;
  labels: Int32Array;
  inertia: number;
  silhouette: number | null;
}

export type KMeansRunner = (task: Omit<KMeansRunTask, 'kind'>) => Promise<KMeansRunOutcome>;

export interface ClusterOptions {
  /** Null: the k of highest silhouette within SUGGESTED_K_RANGE. */
  k: number | null;
  seed: number;
  restarts: number;
  /** Moments the silhouette is measured on (scikit-learn's silhouette_score takes a sample_size alike). */
  sampleSize?: number;
}

export interface MomentClusters {
  k: number;
  labels: Int32Array;
  /** k rows of standardised centres. */
  centres: number[][];
  inertia: number;
  silhouettes: SilhouetteOfK[];
  scaling: { mean: number[]; sd: number[] };
}

export const SILHOUETTE_SAMPLE = 2000;

/** One task's work (the thread's side). */
export function runKMeansTask(task: Omit<KMeansRunTask, 'kind'>): KMeansRunOutcome {
  const result = kMeansRestart(task.points, task.dims, task.k, task.seed);
  const silhouette = task.withSilhouette ? silhouetteScore(task.points, task.dims, result.labels) : null;
  return { centres: result.centres, labels: result.labels, inertia: result.inertia, silhouette };
}

export async function clusterMoments(
  raw: Float64Array,
  dims: number,
  options: ClusterOptions,
  run: KMeansRunner,
): Promise<MomentClusters> {
  const n = raw.length / dims;
  const { points, scaling } = standardise(raw, dims);
  let k = options.k;
  let silhouettes: SilhouetteOfK[] = [];
  if (k === null) {
    silhouettes = await suggestK(points, dims, options, run);
    if (silhouettes.length === 0) throw new Error(`only ${n} moments: too few to choose a number of clusters`);
    k = silhouettes.reduce((best, item) => (item.silhouette > best.silhouette ? item : best)).k;
  }
  if (k > n) throw new Error(`${n} moments cannot make ${k} clusters; choose a smaller k`);
  const runs = await Promise.all(
    Array.from({ length: Math.max(1, options.restarts) }, (_, r) =>
      run({ points, dims, k: k!, seed: restartSeed(options.seed, r), withSilhouette: false }),
    ),
  );
  const best = runs.reduce((x, y) => (y.inertia < x.inertia ? y : x));
  return {
    k,
    labels: best.labels,
    centres: Array.from({ length: k }, (_, c) => [...best.centres.subarray(c * dims, (c + 1) * dims)]),
    inertia: best.inertia,
    silhouettes,
    scaling,
  };
}

/** Silhouette of the best restart for each candidate k, on a seeded sample of the moments. */
async function suggestK(points: Float64Array, dims: number, options: ClusterOptions, run: KMeansRunner) {
  const n = points.length / dims;
  const order = shuffleInPlace(
    Array.from({ length: n }, (_, i) => i),
    mulberry32(options.seed),
  ).slice(0, options.sampleSize ?? SILHOUETTE_SAMPLE);
  const sample = new Float64Array(order.length * dims);
  order.forEach((i, row) => sample.set(points.subarray(i * dims, (i + 1) * dims), row * dims));
  const candidates: number[] = [];
  for (let k = SUGGESTED_K_RANGE.from; k <= Math.min(SUGGESTED_K_RANGE.to, order.length - 1); k += 1)
    candidates.push(k);
  return Promise.all(
    candidates.map(async (k) => {
      const runs = await Promise.all(
        Array.from({ length: Math.max(1, options.restarts) }, (_, r) =>
          run({ points: sample, dims, k, seed: restartSeed(options.seed, r), withSilhouette: true }),
        ),
      );
      const best = runs.reduce((x, y) => (y.inertia < x.inertia ? y : x));
      return { k, silhouette: best.silhouette! };
    }),
  );
}

/** Z-scores per dimension; a dimension that never varies keeps sd 1 (it then adds nothing to any distance). */
export function standardise(raw: Float64Array, dims: number) {
  const n = raw.length / dims;
  const mean = new Array<number>(dims).fill(0);
  const sd = new Array<number>(dims).fill(0);
  for (let i = 0; i < n; i += 1) for (let j = 0; j < dims; j += 1) mean[j]! += raw[i * dims + j]!;
  for (let j = 0; j < dims; j += 1) mean[j]! /= Math.max(1, n);
  for (let i = 0; i < n; i += 1) for (let j = 0; j < dims; j += 1) sd[j]! += (raw[i * dims + j]! - mean[j]!) ** 2;
  for (let j = 0; j < dims; j += 1) sd[j] = Math.sqrt(sd[j]! / Math.max(1, n)) || 1;
  const points = new Float64Array(raw.length);
  for (let i = 0; i < n; i += 1) {
    for (let j = 0; j < dims; j += 1) points[i * dims + j] = (raw[i * dims + j]! - mean[j]!) / sd[j]!;
  }
  return { points, scaling: { mean, sd } };
}
