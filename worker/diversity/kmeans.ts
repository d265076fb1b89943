/**
 * k-means over row-major points (n × d, Float64Array), as Lloyd's algorithm with k-means++ seeding and seeded
 * restarts, keeping the restart of least inertia.
 * - Lloyd, "Least squares quantization in PCM", IEEE Trans. Inf. Theory 28(2), 1982 [M].
 * - Arthur & Vassilvitskii, "k-means++: the advantages of careful seeding", SODA 2007 [M], in its greedy form
 *   (2 + ⌊ln k⌋ candidates per centre, the best kept), as scikit-learn seeds it.
 * Stopping follows scikit-learn's `KMeans(algorithm="lloyd")`: stop when the labels no longer change, or when the
 * summed squared shift of the centres is at most tol × the mean per-dimension variance of the points; if the loop
 * stopped on the shift, the labels are taken once more against the final centres. Ties go to the lower centre.
 * So the same initial centres give scikit-learn's labels and inertia (tests/unit/diversity/kmeans.test.ts).
 */
import { fmix32, mulberry32, type RandomSource } from '../../shared/pairing/seeded-random';

export interface KMeansOptions {
  k: number;
  /** Restarts, each with its own k-means++ seeding; the least inertia wins. */
  restarts: number;
  seed: number;
  maxIterations?: number;
  /** Relative tolerance on the centre shift (scikit-learn's default 1e-4). */
  tol?: number;
}

export interface KMeansResult {
  /** k × d centres, row-major. */
  centres: Float64Array;
  /** The nearest centre of each point. */
  labels: Int32Array;
  /** Sum of squared distances of the points to their centres. */
  inertia: number;
  iterations: number;
}

const DEFAULT_MAX_ITERATIONS = 300;
const DEFAULT_TOL = 1e-4;
/** ⌊2^32 / φ⌋, Knuth's multiplicative hashing constant [M]: spreads consecutive restart numbers apart. */
const GOLDEN_RATIO_32 = 0x9e3779b9;

/**
 * The best of `restarts` seeded runs (the earlier on equal inertia). Each restart has its own seed (restartSeed),
 * so restarts may run on different threads and still give this result.
 */
export function kMeans(points: Float64Array, dims: number, options: KMeansOptions): KMeansResult {
  let best: KMeansResult | null = null;
  for (let run = 0; run < Math.max(1, options.restarts); run += 1) {
    const result = kMeansRestart(points, dims, options.k, restartSeed(options.seed, run), options);
    if (best === null || result.inertia < best.inertia) best = result;
  }
  return best!;
}

/** One restart: k-means++ seeding from `seed`, then Lloyd's iterations. */
export function kMeansRestart(
  points: Float64Array,
  dims: number,
  k: number,
  seed: number,
  options: Pick<KMeansOptions, 'maxIterations' | 'tol'> = {},
): KMeansResult {
  const n = pointCount(points, dims);
  if (k < 1 || k > n) throw new Error(`k-means: k must be within 1..${n}, got ${k}`);
  return lloyd(points, dims, kMeansPlusPlus(points, dims, k, mulberry32(seed)), options);
}

/** The seed of restart `run` of a clustering seeded with `seed`. */
export function restartSeed(seed: number, run: number): number {
  return fmix32((seed >>> 0) ^ Math.imul(run + 1, GOLDEN_RATIO_32));
}

/** Greedy k-means++: the first centre uniformly, each next one the best of a few candidates drawn ∝ D². */
export function kMeansPlusPlus(points: Float64Array, dims: number, k: number, random: RandomSource): Float64Array {
  const n = pointCount(points, dims);
  const centres = new Float64Array(k * dims);
  const trials = 2 + Math.floor(Math.log(k));
  const first = Math.min(n - 1, Math.floor(random() * n));
  centres.set(points.subarray(first * dims, first * dims + dims), 0);
  const closest = new Float64Array(n);
  for (let i = 0; i < n; i += 1) closest[i] = squaredDistance(points, i * dims, points, first * dims, dims);
  const candidateClosest = new Float64Array(n);
  const bestClosest = new Float64Array(n);
  for (let c = 1; c < k; c += 1) {
    const potential = sum(closest);
    let bestPotential = Infinity;
    let bestCandidate = 0;
    for (let t = 0; t < trials; t += 1) {
      const candidate = drawProportional(closest, potential, random);
      let candidatePotential = 0;
      for (let i = 0; i < n; i += 1) {
        const d = squaredDistanceBelow(points, i * dims, points, candidate * dims, dims, closest[i]!);
        candidateClosest[i] = d;
        candidatePotential += d;
      }
      if (candidatePotential < bestPotential) {
        bestPotential = candidatePotential;
        bestCandidate = candidate;
        bestClosest.set(candidateClosest);
      }
    }
    centres.set(points.subarray(bestCandidate * dims, bestCandidate * dims + dims), c * dims);
    closest.set(bestClosest);
  }
  return centres;
}

/** Lloyd's iterations from the given centres (not changed). */
export function lloyd(
  points: Float64Array,
  dims: number,
  initial: Float64Array,
  options: Pick<KMeansOptions, 'maxIterations' | 'tol'> = {},
): KMeansResult {
  const n = pointCount(points, dims);
  const k = initial.length / dims;
  const tolerance = (options.tol ?? DEFAULT_TOL) * meanVariance(points, dims);
  let centres = Float64Array.from(initial);
  let next = new Float64Array(k * dims);
  const labels = new Int32Array(n);
  const previous = new Int32Array(n).fill(-1);
  const counts = new Float64Array(k);
  const maxIterations = options.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  let iterations = 0;
  let settled = false;
  for (; iterations < maxIterations;) {
    assign(points, dims, centres, labels);
    updateCentres(points, dims, labels, centres, next, counts);
    [centres, next] = [next, centres];
    iterations += 1;
    if (equalLabels(labels, previous)) {
      settled = true;
      break;
    }
    let shift = 0;
    for (let j = 0; j < k * dims; j += 1) shift += (centres[j]! - next[j]!) ** 2;
    if (shift <= tolerance) break;
    previous.set(labels);
  }
  if (!settled) assign(points, dims, centres, labels);
  return { centres, labels, inertia: inertia(points, dims, centres, labels), iterations };
}

/**
 * Labels each point with its nearest centre (the lower index on a tie). A centre's sum stops once it reaches the
 * best so far: it could not win, so the labels are those of full sums, found in a fraction of the work.
 */
export function assign(points: Float64Array, dims: number, centres: Float64Array, labels: Int32Array): void {
  const n = labels.length;
  const k = centres.length / dims;
  for (let i = 0; i < n; i += 1) {
    const offset = i * dims;
    let best = Infinity;
    let label = 0;
    for (let c = 0; c < k; c += 1) {
      const d = squaredDistanceBelow(points, offset, centres, c * dims, dims, best);
      if (d < best) {
        best = d;
        label = c;
      }
    }
    labels[i] = label;
  }
}

export function inertia(points: Float64Array, dims: number, centres: Float64Array, labels: Int32Array): number {
  let total = 0;
  for (let i = 0; i < labels.length; i += 1)
    total += squaredDistance(points, i * dims, centres, labels[i]! * dims, dims);
  return total;
}

/**
 * Means of the labelled points. A centre that lost every point takes the point farthest from its own centre (the
 * farthest first, one per empty centre), as scikit-learn relocates empty clusters, so k clusters stay k.
 */
function updateCentres(
  points: Float64Array,
  dims: number,
  labels: Int32Array,
  old: Float64Array,
  out: Float64Array,
  counts: Float64Array,
): void {
  out.fill(0);
  counts.fill(0);
  for (let i = 0; i < labels.length; i += 1) {
    const c = labels[i]!;
    counts[c] += 1;
    for (let j = 0; j < dims; j += 1) out[c * dims + j] += points[i * dims + j]!;
  }
  const empty: number[] = [];
  for (let c = 0; c < counts.length; c += 1) {
    if (counts[c] === 0) empty.push(c);
    else for (let j = 0; j < dims; j += 1) out[c * dims + j] /= counts[c]!;
  }
  if (empty.length === 0) return;
  const far = [...labels.keys()]
    .map((i) => ({ i, d: squaredDistance(points, i * dims, old, labels[i]! * dims, dims) }))
    .sort((x, y) => y.d - x.d || x.i - y.i);
  empty.forEach((c, e) => {
    const i = far[e]!.i;
    out.set(points.subarray(i * dims, i * dims + dims), c * dims);
  });
}

/** The squared distance, or a partial sum ≥ `limit` as soon as the sum reaches it (then: `limit` stands). */
function squaredDistanceBelow(
  x: Float64Array,
  xOffset: number,
  y: Float64Array,
  yOffset: number,
  dims: number,
  limit: number,
): number {
  let total = 0;
  for (let j = 0; j < dims; j += 1) {
    const d = x[xOffset + j]! - y[yOffset + j]!;
    total += d * d;
    if (total >= limit) return limit;
  }
  return total;
}

export function squaredDistance(x: Float64Array, xOffset: number, y: Float64Array, yOffset: number, dims: number) {
  let total = 0;
  for (let j = 0; j < dims; j += 1) {
    const d = x[xOffset + j]! - y[yOffset + j]!;
    total += d * d;
  }
  return total;
}

function meanVariance(points: Float64Array, dims: number): number {
  const n = pointCount(points, dims);
  let total = 0;
  for (let j = 0; j < dims; j += 1) {
    let mean = 0;
    for (let i = 0; i < n; i += 1) mean += points[i * dims + j]!;
    mean /= n;
    let variance = 0;
    for (let i = 0; i < n; i += 1) variance += (points[i * dims + j]! - mean) ** 2;
    total += variance / n;
  }
  return total / dims;
}

function drawProportional(weights: Float64Array, total: number, random: RandomSource): number {
  if (!(total > 0)) return Math.min(weights.length - 1, Math.floor(random() * weights.length));
  const target = random() * total;
  let running = 0;
  for (let i = 0; i < weights.length; i += 1) {
    running += weights[i]!;
    if (running > target) return i;
  }
  return weights.length - 1;
}

function equalLabels(x: Int32Array, y: Int32Array): boolean {
  for (let i = 0; i < x.length; i += 1) if (x[i] !== y[i]) return false;
  return true;
}

function sum(values: Float64Array): number {
  let total = 0;
  for (const value of values) total += value;
  return total;
}

function pointCount(points: Float64Array, dims: number): number {
  if (dims < 1 || points.length % dims !== 0)
    throw new Error(`k-means: ${points.length} values are not rows of ${dims}`);
  return points.length / dims;
}
