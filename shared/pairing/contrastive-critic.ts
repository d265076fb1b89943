/**
 * A small trained critic for one view pair: one linear encoder per view, trained with InfoNCE over in-batch
 * negatives, as contrastive multi-view learning trains its encoders (Tian, Krishnan, Isola, "Contrastive Multiview
 * Coding", 2019 [M]), only small enough to train on two CPU cores in seconds.
 *
 * Encoders: view a's descriptor x (D values) is extended to x̃ = [x, ‖x‖²/D, 1] and mapped to g(x) = W x̃ in
 * `embedDims` dimensions; view b likewise with its own V. The score of a candidate pair is g(x)·h(y)/τ at the
 * pairset's temperature τ. The embeddings are not normalised, so the critic learns its own scale and τ sets only
 * how fast the scores grow. Both encoders start from the same small random matrix: the untrained critic scores a
 * pair by a faint random-projection similarity of the two descriptors, nearly uniform scores and a bound near 0,
 * and training grows what the stopping pairs (below) confirm. Why ‖x‖²/D and the constant: with them the score can
 * hold any α·x·y − β(‖x‖² + ‖y‖²) + c, which for jointly Gaussian views is exactly the optimal critic
 * log p(y|x)/p(y) up to a constant (see the Gaussian checks in tests/unit/pairing/contrastive-critic.test.ts).
 *
 * Loss: for a batch of B pairs, every pair's other B − 1 partners are its negatives; the InfoNCE loss is taken
 * both ways (a→b over the rows of the score matrix, b→a over its columns) and averaged, as pair-difficulty.ts
 * measures it. Gradient: for s = GHᵀ/τ, ∂L/∂s = (P_row + P_column − 2I)/(2B), with P the softmax of each row or
 * column; ∂L/∂G = (∂L/∂s)H/τ and ∂L/∂H = (∂L/∂s)ᵀG/τ (the usual softmax cross-entropy gradient [M]).
 * Optimiser: Adam (Kingma & Ba, "Adam: A Method for Stochastic Optimization", 2015, Algorithm 1: β1 = 0.9,
 * β2 = 0.999, ε = 1e-8 [M]) with decoupled weight decay (Loshchilov & Hutter, "Decoupled Weight Decay
 * Regularization", 2019 [M]), for a fixed number of steps. About a quarter of the training pairs, whole clips
 * where there are several, is set aside as stopping pairs: every `curveEvery` steps the loss on them is measured
 * and the weights of the best step are kept (early stopping, common practice), so a critic that starts to learn
 * its few training clips by heart is not reported. For two views of the same kind (a frame and its neighbour) the
 * two encoders can be tied into one, which halves what a small sample must fit.
 *
 * Determinism: one training runs on one thread, in Float64, with every sum taken in index order and batches drawn
 * by a seeded shuffle, so the same inputs and options give the same critic bit for bit, whatever the thread count.
 */

import { mulberry32, shuffleInPlace, standardNormal, type RandomSource } from './seeded-random';

export interface CriticOptions {
  temperature: number;
  /** Size of each encoder's output. */
  embedDims: number;
  /** The fixed training budget: gradient steps, each over one batch. */
  steps: number;
  /** Pairs per training batch (1 positive and batch − 1 in-batch negatives for each anchor). */
  batch: number;
  learningRate: number;
  weightDecay: number;
  /** Scale of the initial weights, relative to 1/√(embedDims · (D + 2)). */
  initScale: number;
  /** Every `curveEvery` steps the curve records the mean training loss and the loss on the stopping pairs. */
  curveEvery: number;
  /** Share of the training pairs set aside to choose which step's weights to keep (early stopping). */
  stopShare: number;
  /** One encoder for both views (W = V), for two views of the same kind, such as a frame and its neighbour. */
  tied: boolean;
  seed: number;
}

/** The settings every critic shares; temperature, seed and tying are the view pair's. */
export const DEFAULT_CRITIC: Readonly<Omit<CriticOptions, 'temperature' | 'seed' | 'tied'>> = Object.freeze({
  embedDims: 32,
  steps: 800,
  batch: 64,
  learningRate: 0.001,
  weightDecay: 0.01,
  initScale: 0.1,
  // Checked often: on a few clips what carries over to new ones is learnt in the first steps and the rest fits
  // particulars; checked every 10 steps, the frame~motion critic on most demo-like footage tried already had its
  // stopping loss above step 0's at the first check and was reported untrained (docs/pairsets.md, "Checks").
  curveEvery: 2,
  stopShare: 0.25,
});

export interface TrainedCritic {
  inputDims: number;
  embedDims: number;
  temperature: number;
  /** embedDims × (inputDims + 2), row by row, for view a; `wb` for view b. */
  wa: Float64Array;
  wb: Float64Array;
}

export interface CurvePoint {
  /** Steps done at the end of the stretch. */
  step: number;
  /** Mean training-batch loss over the stretch (nats). */
  loss: number;
  /** Loss on the stopping pairs at that step (nats). */
  stopLoss: number;
}

export interface CriticTraining {
  critic: TrainedCritic;
  curve: CurvePoint[];
  /** Pairs per training batch actually used (the batch option, or fewer when the sample is smaller). */
  batch: number;
  /** Pairs per batch of the stopping loss. */
  stopBatch: number;
  fitPairs: number;
  stopPairs: number;
  /** The step whose weights were kept: the one with the lowest stopping loss (0: the untrained critic). */
  keptStep: number;
}

const ADAM_BETA1 = 0.9;
const ADAM_BETA2 = 0.999;
const ADAM_EPSILON = 1e-8;
/** Fewest pairs to train on: two to fit and two to stop on. */
export const MIN_PAIRS = 4;
/** Smallest fall of the stopping loss (nats) that counts as better. */
const STOP_IMPROVEMENT = 1e-6;

/**
 * Trains a critic on pairs (a[i], b[i]); every descriptor of both views has the same length. `groups[i]` names
 * where pair i comes from (its clip): the stopping pairs are whole groups, so the step kept is the one that
 * carries over to clips the critic never fitted, as the held-out pairs are.
 */
export function trainCritic(
  a: readonly Float32Array[],
  b: readonly Float32Array[],
  groups: readonly number[],
  options: CriticOptions,
): CriticTraining {
  if (a.length !== b.length || groups.length !== a.length) throw new RangeError('each pair needs both views');
  if (a.length < MIN_PAIRS) {
    throw new RangeError(`a critic needs at least ${MIN_PAIRS} pairs to train, got ${a.length}`);
  }
  const inputDims = a[0]!.length;
  if ([...a, ...b].some((x) => x.length !== inputDims)) throw new RangeError('descriptors differ in length');
  if (!(options.temperature > 0)) throw new RangeError(`temperature must be positive, got ${options.temperature}`);
  const m = options.embedDims;
  const width = inputDims + 2;
  const random = mulberry32(options.seed);
  const init = options.initScale / Math.sqrt(m * width);
  const start = Float64Array.from({ length: m * width }, () => init * standardNormal(random));
  const critic: TrainedCritic = {
    inputDims,
    embedDims: m,
    temperature: options.temperature,
    wa: start.slice(),
    wb: start.slice(),
  };
  const split = stoppingSplit(groups, options.stopShare, random);
  const xa = a.map(extend);
  const xb = b.map(extend);
  const fitA = split.fit.map((i) => xa[i]!);
  const fitB = split.fit.map((i) => xb[i]!);
  const stopA = split.stop.map((i) => xa[i]!);
  const stopB = split.stop.map((i) => xb[i]!);
  const batch = Math.min(options.batch, fitA.length);
  const stopBatch = Math.min(options.batch, stopA.length);
  const adamA = new AdamState(m * width);
  const adamB = new AdamState(m * width);
  const gradA = new Float64Array(m * width);
  const gradB = new Float64Array(m * width);
  const work = new BatchWork(batch, m);
  const stopWork = new BatchWork(stopBatch, m);
  const draw = batchDrawer(fitA.length, batch, random);
  const stopLoss = () => {
    let total = 0;
    const batches = Math.floor(stopA.length / stopBatch);
    for (let k = 0; k < batches; k += 1) {
      total += stopWork.lossAndGradient(
        critic,
        stopA.slice(k * stopBatch, (k + 1) * stopBatch),
        stopB.slice(k * stopBatch, (k + 1) * stopBatch),
        null,
        null,
      );
    }
    return total / batches;
  };
  let best = { step: 0, stopLoss: stopLoss(), wa: critic.wa.slice(), wb: critic.wb.slice() };
  const curve: CurvePoint[] = [];
  let stretch = 0;
  for (let step = 1; step <= options.steps; step += 1) {
    const members = draw();
    stretch += work.lossAndGradient(
      critic,
      members.map((i) => fitA[i]!),
      members.map((i) => fitB[i]!),
      gradA,
      gradB,
    );
    if (options.tied) {
      // One matrix used on both sides: its gradient is the sum of the two sides' gradients.
      for (let i = 0; i < gradA.length; i += 1) gradA[i] += gradB[i]!;
      adamA.step(critic.wa, gradA, options.learningRate, options.weightDecay);
      critic.wb.set(critic.wa);
    } else {
      adamA.step(critic.wa, gradA, options.learningRate, options.weightDecay);
      adamB.step(critic.wb, gradB, options.learningRate, options.weightDecay);
    }
    if (step % options.curveEvery === 0 || step === options.steps) {
      const since = step % options.curveEvery === 0 ? options.curveEvery : step % options.curveEvery;
      const point = { step, loss: stretch / since, stopLoss: stopLoss() };
      curve.push(point);
      // A real improvement only: float noise on a flat stopping loss must not move the kept step.
      if (point.stopLoss < best.stopLoss - STOP_IMPROVEMENT) {
        best = { step, stopLoss: point.stopLoss, wa: critic.wa.slice(), wb: critic.wb.slice() };
      }
      stretch = 0;
    }
  }
  critic.wa.set(best.wa);
  critic.wb.set(best.wb);
  return {
    critic,
    curve,
    batch,
    stopBatch,
    fitPairs: fitA.length,
    stopPairs: stopA.length,
    keptStep: best.step,
  };
}

/**
 * Pairs set aside from the training sample to choose the step to keep; the rest fit the critic. Whole groups are
 * set aside, in a seeded order, until they hold `share` of the pairs, while at least half of the pairs and one
 * group stay to fit; with a single group, or no group small enough, single pairs are set aside instead.
 */
function stoppingSplit(
  groups: readonly number[],
  share: number,
  random: RandomSource,
): { fit: number[]; stop: number[] } {
  const count = groups.length;
  const wanted = Math.min(count - 2, Math.max(2, Math.round(count * share)));
  const members = new Map<number, number[]>();
  groups.forEach((group, i) => members.set(group, [...(members.get(group) ?? []), i]));
  const order = shuffleInPlace(
    [...members.keys()].sort((x, y) => x - y),
    random,
  );
  const stop: number[] = [];
  for (const group of order.slice(0, -1)) {
    if (stop.length >= wanted) break;
    const next = members.get(group)!;
    if (stop.length + next.length <= count / 2) stop.push(...next);
  }
  if (stop.length < 2) {
    const pairs = shuffleInPlace([...Array(count).keys()], random);
    return { fit: pairs.slice(wanted), stop: pairs.slice(0, wanted) };
  }
  const held = new Set(stop);
  return { fit: [...Array(count).keys()].filter((i) => !held.has(i)), stop: stop.sort((x, y) => x - y) };
}

/** The embedding of one descriptor by one side's encoder. */
export function encodeView(critic: TrainedCritic, side: 'a' | 'b', x: Float32Array): Float64Array {
  if (x.length !== critic.inputDims) {
    throw new RangeError(`the critic reads ${critic.inputDims} values, got ${x.length}`);
  }
  const out = new Float64Array(critic.embedDims);
  project(side === 'a' ? critic.wa : critic.wb, extend(x), out);
  return out;
}

/** x̃ = [x, ‖x‖²/D, 1] (see the module comment). */
function extend(x: Float32Array): Float64Array {
  const out = new Float64Array(x.length + 2);
  let square = 0;
  for (let i = 0; i < x.length; i += 1) {
    out[i] = x[i]!;
    square += x[i]! * x[i]!;
  }
  out[x.length] = square / x.length;
  out[x.length + 1] = 1;
  return out;
}

function project(weights: Float64Array, x: Float64Array, out: Float64Array): void {
  const width = x.length;
  for (let r = 0; r < out.length; r += 1) {
    let acc = 0;
    const row = r * width;
    for (let i = 0; i < width; i += 1) acc += weights[row + i]! * x[i]!;
    out[r] = acc;
  }
}

/** Batches of distinct pairs: a seeded shuffle cut in order, reshuffled when too few pairs are left. */
function batchDrawer(count: number, batch: number, random: RandomSource): () => number[] {
  let order: number[] = [];
  let next = 0;
  return () => {
    if (next + batch > order.length) {
      order = shuffleInPlace([...Array(count).keys()], random);
      next = 0;
    }
    next += batch;
    return order.slice(next - batch, next);
  };
}

/** Buffers of one training batch, reused from step to step. */
class BatchWork {
  private readonly g: Float64Array[];
  private readonly h: Float64Array[];
  private readonly scores: Float64Array;
  private readonly dScores: Float64Array;
  private readonly dg: Float64Array;
  private readonly dh: Float64Array;

  constructor(
    private readonly size: number,
    private readonly dims: number,
  ) {
    this.g = Array.from({ length: size }, () => new Float64Array(dims));
    this.h = Array.from({ length: size }, () => new Float64Array(dims));
    this.scores = new Float64Array(size * size);
    this.dScores = new Float64Array(size * size);
    this.dg = new Float64Array(dims);
    this.dh = new Float64Array(dims);
  }

  /** The batch's two-way InfoNCE loss; writes its gradients with respect to wa and wb into gradA and gradB. */
  lossAndGradient(
    critic: TrainedCritic,
    xa: Float64Array[],
    xb: Float64Array[],
    gradA: Float64Array | null,
    gradB: Float64Array | null,
  ): number {
    const { size: n, dims: m, scores, dScores } = this;
    const inverseT = 1 / critic.temperature;
    for (let i = 0; i < n; i += 1) {
      project(critic.wa, xa[i]!, this.g[i]!);
      project(critic.wb, xb[i]!, this.h[i]!);
    }
    for (let i = 0; i < n; i += 1) {
      for (let j = 0; j < n; j += 1) scores[i * n + j] = dot(this.g[i]!, this.h[j]!, m) * inverseT;
    }
    dScores.fill(0);
    let loss = 0;
    const share = 1 / (2 * n);
    for (let i = 0; i < n; i += 1) loss += softmaxInto(scores, i * n, 1, n, dScores, share, i);
    for (let j = 0; j < n; j += 1) loss += softmaxInto(scores, j, n, n, dScores, share, j);
    if (!gradA || !gradB) return loss * share;
    gradA.fill(0);
    gradB.fill(0);
    const width = xa[0]!.length;
    for (let i = 0; i < n; i += 1) {
      // dG_i = Σ_j dS_ij H_j / τ and dH_i = Σ_j dS_ji G_j / τ, then the outer products with the inputs.
      this.dg.fill(0);
      this.dh.fill(0);
      for (let j = 0; j < n; j += 1) {
        const forward = dScores[i * n + j]! * inverseT;
        const backward = dScores[j * n + i]! * inverseT;
        const hj = this.h[j]!;
        const gj = this.g[j]!;
        for (let r = 0; r < m; r += 1) {
          this.dg[r] += forward * hj[r]!;
          this.dh[r] += backward * gj[r]!;
        }
      }
      addOuter(gradA, this.dg, xa[i]!, width);
      addOuter(gradB, this.dh, xb[i]!, width);
    }
    return loss * share;
  }
}

function dot(x: Float64Array, y: Float64Array, length: number): number {
  let acc = 0;
  for (let r = 0; r < length; r += 1) acc += x[r]! * y[r]!;
  return acc;
}

function addOuter(target: Float64Array, left: Float64Array, right: Float64Array, width: number): void {
  for (let r = 0; r < left.length; r += 1) {
    const scale = left[r]!;
    if (scale === 0) continue;
    const row = r * width;
    for (let c = 0; c < width; c += 1) target[row + c] += scale * right[c]!;
  }
}

/**
 * Softmax cross-entropy of one row or column of `scores` (start, stride, length) against `positive`: adds
 * share · (softmax − one-hot) into `gradient` at the same places and returns the loss, computed stably.
 */
function softmaxInto(
  scores: Float64Array,
  start: number,
  stride: number,
  length: number,
  gradient: Float64Array,
  share: number,
  positive: number,
): number {
  let max = -Infinity;
  for (let k = 0; k < length; k += 1) max = Math.max(max, scores[start + k * stride]!);
  let sum = 0;
  for (let k = 0; k < length; k += 1) sum += Math.exp(scores[start + k * stride]! - max);
  const logSum = Math.log(sum) + max;
  for (let k = 0; k < length; k += 1) {
    const at = start + k * stride;
    gradient[at] += share * (Math.exp(scores[at]! - logSum) - (k === positive ? 1 : 0));
  }
  return logSum - scores[start + positive * stride]!;
}

/** Adam's moment estimates for one weight matrix. */
class AdamState {
  private readonly first: Float64Array;
  private readonly second: Float64Array;
  private t = 0;

  constructor(size: number) {
    this.first = new Float64Array(size);
    this.second = new Float64Array(size);
  }

  step(weights: Float64Array, gradient: Float64Array, rate: number, decay: number): void {
    this.t += 1;
    const correct1 = 1 - ADAM_BETA1 ** this.t;
    const correct2 = 1 - ADAM_BETA2 ** this.t;
    for (let i = 0; i < weights.length; i += 1) {
      const g = gradient[i]!;
      this.first[i] = ADAM_BETA1 * this.first[i]! + (1 - ADAM_BETA1) * g;
      this.second[i] = ADAM_BETA2 * this.second[i]! + (1 - ADAM_BETA2) * g * g;
      const move = this.first[i]! / correct1 / (Math.sqrt(this.second[i]! / correct2) + ADAM_EPSILON);
      weights[i] -= rate * (move + decay * weights[i]!);
    }
  }
}
