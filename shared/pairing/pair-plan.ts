/**
 * The pairs a pairset definition gives over a set of clips, in shard order, and their counts per view pair and
 * split. The same plan backs the live counts of the definition form and the build, so what the form shows is
 * what the shards hold.
 *
 * Order (the shards follow it): train before val; within a split clips by id; within a clip moments ascending;
 * within a moment the view pairs in graph order (pairing-graph.ts). A pair is valid where validMoments says so
 * (never across a cut, never past the clip's end); a pair with the motion view also needs the moment's field.
 */

import { validMoments, type MomentFilter, type MomentFrame, type ViewPair } from './pairing-graph';
import { splitOfClip, type SplitName, type SplitOptions } from './split';

export const SPLIT_ORDER: readonly SplitName[] = ['train', 'val'];

export interface PlanClip {
  id: number;
  frames: readonly MomentFrame[];
}

export interface PlannedPair {
  clipId: number;
  split: SplitName;
  /** Frame index t of the moment. */
  moment: number;
  pair: ViewPair;
}

export interface KindSplitCount {
  pair: ViewPair;
  train: number;
  val: number;
  total: number;
}

/** Every pair of `pairs` over `clips`, in shard order. */
export function planPairs(
  clips: readonly PlanClip[],
  pairs: readonly ViewPair[],
  split: SplitOptions,
  filter: MomentFilter = {},
): PlannedPair[] {
  const bySplit = new Map<SplitName, PlanClip[]>(SPLIT_ORDER.map((name) => [name, []]));
  for (const clip of [...clips].sort((x, y) => x.id - y.id)) bySplit.get(splitOfClip(clip.id, split))!.push(clip);
  const planned: PlannedPair[] = [];
  for (const name of SPLIT_ORDER) {
    for (const clip of bySplit.get(name)!) planned.push(...clipPairs(clip, pairs, name, filter));
  }
  return planned;
}

/** Counts per view pair (in the given order) and split. */
export function countPlanned(planned: readonly PlannedPair[], pairs: readonly ViewPair[]): KindSplitCount[] {
  const counts = new Map(pairs.map((pair) => [pair.kind, { pair, train: 0, val: 0, total: 0 }]));
  for (const item of planned) {
    const count = counts.get(item.pair.kind);
    if (!count) continue;
    count[item.split] += 1;
    count.total += 1;
  }
  return [...counts.values()];
}

function clipPairs(clip: PlanClip, pairs: readonly ViewPair[], split: SplitName, filter: MomentFilter) {
  const withMotion = new Set(clip.frames.filter((frame) => frame.motion).map((frame) => frame.index));
  const validByKind = pairs.map((pair) => {
    const moments = validMoments(clip.frames, pair, filter);
    return new Set(needsMotion(pair) ? moments.filter((t) => withMotion.has(t)) : moments);
  });
  const moments = [...new Set(validByKind.flatMap((set) => [...set]))].sort((x, y) => x - y);
  const out: PlannedPair[] = [];
  for (const moment of moments) {
    pairs.forEach((pair, k) => {
      if (validByKind[k]!.has(moment)) out.push({ clipId: clip.id, split, moment, pair });
    });
  }
  return out;
}

function needsMotion(pair: ViewPair): boolean {
  return pair.a === 'motion' || pair.b === 'motion';
}
