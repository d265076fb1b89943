/**
 * The InfoNCE bound of a trained critic (contrastive-critic.ts) on a set of pairs, at one K: the pairs are
 * shuffled with a seed and cut into batches of K; each pair's other K − 1 partners are its negatives, the loss is
 * taken both ways and averaged, exactly as pair-difficulty.ts does for the fixed embedding, only with the critic's
 * score g(x)·h(y)/τ in place of the cosine/τ. On pairs the critic never saw in training (held-out), log K − loss
 * is a lower bound on the mutual information of the two views (van den Oord et al. 2018, Eq. 4 [V2]; Poole et al.,
 * "On Variational Bounds of Mutual Information", 2019 [M]); on its training pairs it is not, because a critic can
 * learn those pairs by heart, which is why both are reported.
 */

import { encodeView, type TrainedCritic } from './contrastive-critic';
import { infoNceLoss } from './pair-difficulty';
import { mulberry32, shuffleInPlace } from './seeded-random';

export interface CriticBound {
  k: number;
  batches: number;
  /** Anchors scored, counting both directions. */
  anchors: number;
  meanLoss: number;
  logK: number;
  /** log K − mean loss (nats). */
  bound: number;
}

/** The bound at K over pairs (a[i], b[i]), or null when they do not fill one batch of K. */
export function criticBound(
  critic: TrainedCritic,
  a: readonly Float32Array[],
  b: readonly Float32Array[],
  k: number,
  seed: number,
): CriticBound | null {
  if (a.length !== b.length) throw new RangeError('each pair needs both views');
  if (!Number.isInteger(k) || k < 2) throw new RangeError(`K must be an integer ≥ 2, got ${k}`);
  const batches = Math.floor(a.length / k);
  if (batches === 0) return null;
  const order = shuffleInPlace([...a.keys()], mulberry32(seed)).slice(0, batches * k);
  const g = new Map(order.map((i) => [i, encodeView(critic, 'a', a[i]!)]));
  const h = new Map(order.map((i) => [i, encodeView(critic, 'b', b[i]!)]));
  const row = new Float64Array(k);
  const column = new Float64Array(k);
  let total = 0;
  for (let batch = 0; batch < batches; batch += 1) {
    const members = order.slice(batch * k, (batch + 1) * k);
    for (let i = 0; i < k; i += 1) {
      for (let j = 0; j < k; j += 1) {
        row[j] = dot(g.get(members[i]!)!, h.get(members[j]!)!);
        column[j] = dot(g.get(members[j]!)!, h.get(members[i]!)!);
      }
      total += infoNceLoss(row, i, critic.temperature) + infoNceLoss(column, i, critic.temperature);
    }
  }
  const anchors = 2 * batches * k;
  const meanLoss = total / anchors;
  const logK = Math.log(k);
  return { k, batches, anchors, meanLoss, logK, bound: logK - meanLoss };
}

function dot(x: Float64Array, y: Float64Array): number {
  let acc = 0;
  for (let r = 0; r < x.length; r += 1) acc += x[r]! * y[r]!;
  return acc;
}
