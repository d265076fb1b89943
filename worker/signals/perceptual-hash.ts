/**
 * 64-bit difference hash (dHash) of a frame and near-duplicate comparison between clips.
 *
 * Source: Neal Krawetz, "Kind of Like That", The Hacker Factor Blog, 2013 [V2: steps as quoted in copies]:
 * shrink the grey image to 9×8, then for each row set one bit per neighbour pair, 1 when the left pixel is
 * brighter than the right one: 8 rows × 8 differences = 64 bits. Bits run row by row, left to right, the
 * first one most significant. Shrinking is area averaging (shared/pairing/area-resize.ts). Similar images
 * differ in few bits; compare with the Hamming distance. Which distance counts as "near" is common practice
 * (0–5 very similar, above 10 usually different) and is a project setting (flag-thresholds.ts).
 */

import { resizeArea } from '../../shared/pairing/area-resize';
import { popcount32 } from '../../shared/review/hash-bits';

export const DHASH_COLUMNS = 9;
export const DHASH_ROWS = 8;
export const DHASH_BITS = (DHASH_COLUMNS - 1) * DHASH_ROWS;

const HALF_BITS = 32n;
const LOW_MASK = 0xffffffffn;

export interface NearDuplicateMatch<Id> {
  clipId: Id;
  /** Share of this clip's frames within the distance of some frame of that clip, 0..1. */
  share: number;
}

export interface OtherClipHashes<Id> {
  clipId: Id;
  hashes: readonly bigint[];
}

/** dHash of a grey image (any scale; only the order of neighbouring values matters). */
export function dHash(grey: Float32Array, width: number, height: number): bigint {
  const small = resizeArea(grey, width, height, DHASH_COLUMNS, DHASH_ROWS);
  let hash = 0n;
  for (let y = 0; y < DHASH_ROWS; y += 1) {
    for (let x = 0; x < DHASH_COLUMNS - 1; x += 1) {
      const left = small[y * DHASH_COLUMNS + x];
      const right = small[y * DHASH_COLUMNS + x + 1];
      hash = (hash << 1n) | (left > right ? 1n : 0n);
    }
  }
  return hash;
}

/** 16 lowercase hex digits, zero-padded: the form stored in the database. */

/** Share of `hashes` that lie within `maxDistance` of at least one of `otherHashes` (0 when either is empty). */
export function nearDuplicateShare(
  hashes: readonly bigint[],
  otherHashes: readonly bigint[],
  maxDistance: number,
): number {
  if (hashes.length === 0 || otherHashes.length === 0) return 0;
  const mine = splitHalves(hashes);
  const theirs = splitHalves(otherHashes);
  let matched = 0;
  for (let i = 0; i < hashes.length; i += 1) {
    for (let j = 0; j < otherHashes.length; j += 1) {
      const distance = popcount32(mine.low[i] ^ theirs.low[j]) + popcount32(mine.high[i] ^ theirs.high[j]);
      if (distance <= maxDistance) {
        matched += 1;
        break;
      }
    }
  }
  return matched / hashes.length;
}

/** The other clip sharing the most near-duplicate frames with this one, or null when there is none to compare. */
export function bestNearDuplicate<Id>(
  hashes: readonly bigint[],
  others: readonly OtherClipHashes<Id>[],
  maxDistance: number,
): NearDuplicateMatch<Id> | null {
  let best: NearDuplicateMatch<Id> | null = null;
  for (const other of others) {
    const share = nearDuplicateShare(hashes, other.hashes, maxDistance);
    if (best === null || share > best.share) best = { clipId: other.clipId, share };
  }
  return best;
}

/** Bigint arithmetic is slow in the all-pairs loop, so hashes are compared as two 32-bit halves. */
function splitHalves(hashes: readonly bigint[]): { low: Uint32Array; high: Uint32Array } {
  const low = new Uint32Array(hashes.length);
  const high = new Uint32Array(hashes.length);
  hashes.forEach((h, i) => {
    low[i] = Number(h & LOW_MASK);
    high[i] = Number((h >> HALF_BITS) & LOW_MASK);
  });
  return { low, high };
}
