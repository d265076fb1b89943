/**
 * Balancing a pairset's moments across clusters, and an order that takes clusters in turn.
 *
 * Cap: no cluster gives more than m moments. A count cap is m itself. A share cap s asks that every cluster's share
 * of the balanced moments be at most s: m is the largest whole number with m ≤ s · Σ min(c_i, m) over the clusters'
 * moment counts c_i (that sum grows ever more slowly with m, so the m that satisfy it run from 0 up to one largest;
 * m = 0 means s is too small for this many clusters). Moments without a cluster count as one more group.
 * Which moments a capped cluster keeps: those of lowest rank, a seeded hash of clip and frame (FNV-1a + fmix32,
 * seeded-random.ts), so the choice depends on the seed and the moment alone, never on the order of the input.
 */
import type { PlannedPair } from '../pairing/pair-plan';
import { fmix32, fnv1a32 } from '../pairing/seeded-random';
import type { ClusterBalanceRow, MomentRef } from '../types/diversity';

export interface CapOptions {
  capMoments?: number;
  capShare?: number;
}

export type ClusterOf = (clipId: number, moment: number) => number | null;

export interface BalancedPlan {
  planned: PlannedPair[];
  capMoments: number | null;
  rows: ClusterBalanceRow[];
  momentsBefore: number;
  momentsAfter: number;
}

const SAMPLES_PER_CLUSTER = 4;

/** The largest per-cluster count m with m ≤ share · Σ min(c_i, m); 0 when none above 0 holds. */
export function shareCapMoments(counts: readonly number[], share: number): number {
  let m = Math.max(0, ...counts);
  for (; m > 0; m -= 1) {
    let total = 0;
    for (const count of counts) total += Math.min(count, m);
    if (m <= share * total) return m;
  }
  return 0;
}

/** A moment's rank for the seed: lower ranks are kept first. */
export function momentRank(clipId: number, moment: number, seed: number): number {
  return fmix32(fnv1a32(`${clipId}:${moment}`) ^ seed);
}

/** The plan with each cluster's moments capped (every pair of a kept moment stays), and the counts per cluster. */
export function balancePlan(
  planned: readonly PlannedPair[],
  clusterOf: ClusterOf,
  cap: CapOptions,
  seed: number,
): BalancedPlan {
  const groups = new Map<number | null, MomentRef[]>();
  const seen = new Set<string>();
  for (const item of planned) {
    const key = `${item.clipId}:${item.moment}`;
    if (seen.has(key)) continue;
    seen.add(key);
    const cluster = clusterOf(item.clipId, item.moment);
    const list = groups.get(cluster) ?? [];
    list.push({ clipId: item.clipId, frame: item.moment });
    groups.set(cluster, list);
  }
  const counts = [...groups.values()].map((list) => list.length);
  const capMoments =
    cap.capMoments !== undefined
      ? cap.capMoments
      : cap.capShare !== undefined
        ? shareCapMoments(counts, cap.capShare)
        : null;
  const kept = new Set<string>();
  const rows: ClusterBalanceRow[] = [];
  for (const [cluster, moments] of [...groups].sort(([x], [y]) => clusterOrder(x, y))) {
    const ranked = moments
      .map((ref) => ({ ref, rank: momentRank(ref.clipId, ref.frame, seed) }))
      .sort((x, y) => x.rank - y.rank || x.ref.clipId - y.ref.clipId || x.ref.frame - y.ref.frame);
    const keep = capMoments === null ? ranked.length : Math.min(ranked.length, capMoments);
    for (const { ref } of ranked.slice(0, keep)) kept.add(`${ref.clipId}:${ref.frame}`);
    rows.push({
      cluster,
      before: moments.length,
      after: keep,
      samples: ranked.slice(0, Math.min(SAMPLES_PER_CLUSTER, Math.max(keep, 1))).map(({ ref }) => ref),
    });
  }
  return {
    planned: planned.filter((item) => kept.has(`${item.clipId}:${item.moment}`)),
    capMoments,
    rows,
    momentsBefore: seen.size,
    momentsAfter: kept.size,
  };
}

/**
 * The plan reordered within each split so that clusters come in turn: one moment (with all its pairs) from the
 * first cluster, one from the next, and so on, each cluster's moments in plan order; a cluster that runs out
 * drops out of the turn. Splits keep their order (train, then val).
 */
export function mixClusters(planned: readonly PlannedPair[], clusterOf: ClusterOf): PlannedPair[] {
  const out: PlannedPair[] = [];
  let start = 0;
  while (start < planned.length) {
    const split = planned[start]!.split;
    let end = start;
    while (end < planned.length && planned[end]!.split === split) end += 1;
    out.push(...mixSplit(planned.slice(start, end), clusterOf));
    start = end;
  }
  return out;
}

function mixSplit(pairs: readonly PlannedPair[], clusterOf: ClusterOf): PlannedPair[] {
  const queues = new Map<number | null, PlannedPair[][]>();
  for (let i = 0; i < pairs.length;) {
    const { clipId, moment } = pairs[i]!;
    const group: PlannedPair[] = [];
    while (i < pairs.length && pairs[i]!.clipId === clipId && pairs[i]!.moment === moment) group.push(pairs[i++]!);
    const cluster = clusterOf(clipId, moment);
    const queue = queues.get(cluster) ?? [];
    queue.push(group);
    queues.set(cluster, queue);
  }
  const turns = [...queues].sort(([x], [y]) => clusterOrder(x, y)).map(([, queue]) => queue);
  const out: PlannedPair[] = [];
  for (let round = 0; out.length < pairs.length; round += 1) {
    for (const queue of turns) if (round < queue.length) out.push(...queue[round]!);
  }
  return out;
}

/** Clusters by number, unclustered moments last. */
function clusterOrder(x: number | null, y: number | null): number {
  if (x === y) return 0;
  if (x === null) return 1;
  if (y === null) return -1;
  return x - y;
}
