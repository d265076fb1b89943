/**
 * Deterministic train/val split by clip: a clip is never in both.
 *
 * Choice: each clip is placed on its own, by hashing the seed with the clip's id to a number u in [0, 1); the
 * clip goes to val when u < the val ratio. So a clip's split depends only on (seed, clip id, ratio): adding or
 * removing other clips never moves it, and a new version of a pairset over more clips keeps every old val clip in
 * val. The cost is that the val share is met only on average (binomial: with n clips, off by about
 * √(r(1−r)/n)); the counts are shown before building. Hash-based splitting is common practice ("repeatable
 * splitting" with a hash of a stable id). The hash is FNV-1a followed by MurmurHash3's finaliser
 * (seeded-random.ts).
 */

import { fmix32, fnv1a32 } from './seeded-random';

export type SplitName = 'train' | 'val';

export interface SplitOptions {
  /** Share of clips to place in val, 0..1. */
  val: number;
  seed: number;
}

export interface ClipSplit<Id> {
  train: Id[];
  val: Id[];
}

const UINT32_RANGE = 2 ** 32;

/** The clip's position in [0, 1) for this seed. */
export function splitPosition(clipId: string | number, seed: number): number {
  return fmix32(fnv1a32(`${seed}:${clipId}`)) / UINT32_RANGE;
}

export function splitOfClip(clipId: string | number, options: SplitOptions): SplitName {
  if (!(options.val >= 0 && options.val <= 1)) throw new RangeError(`val ratio must be in 0..1, got ${options.val}`);
  return splitPosition(clipId, options.seed) < options.val ? 'val' : 'train';
}

/** Splits clip ids, keeping their given order within each split. */
export function splitClips<Id extends string | number>(clipIds: readonly Id[], options: SplitOptions): ClipSplit<Id> {
  const result: ClipSplit<Id> = { train: [], val: [] };
  for (const id of clipIds) result[splitOfClip(id, options)].push(id);
  return result;
}
