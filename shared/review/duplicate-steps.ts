import { hammingDistance, hexToHash } from './hash-bits';
/**
 * Two clips' frames in step, for comparing a near-duplicate side by side: the shift between them (a copy may start
 * a few frames later or earlier) and the dHash distance of every frame pair at that shift. The shift is the one
 * whose overlapping pairs have the smallest mean distance, among shifts that overlap at least half of the shorter
 * clip (a few frames overlapping by chance must not win); ties go to the smaller shift. Hashes are the stored 16
 * hex digits of a 64-bit dHash; the distance is the number of differing bits, as the duplicate flag counts it.
 */

export interface DuplicateStep {
  /** Frame of the clip under review. */
  index: number;
  /** The frame of the other clip in step with it; null where the other clip has none there. */
  otherIndex: number | null;
  /** Differing hash bits (0–64); null where a frame or a hash is missing. */
  distance: number | null;
}

export interface DuplicateAlignment {
  /** otherIndex = index + shift. */
  shift: number;
  steps: DuplicateStep[];
  /** Mean distance over the pairs in step; null when none. */
  meanDistance: number | null;
}

const MIN_OVERLAP_SHARE = 0.5;

/** Differing bits of two 64-bit hashes given as 16 hex digits each. */
export function hexHashDistance(a: string, b: string): number {
  return hammingDistance(hexToHash(a), hexToHash(b));
}

/** `hashes[i]`: the hash of frame i, null where it was not measured. */
export function alignDuplicate(
  hashes: readonly (string | null)[],
  others: readonly (string | null)[],
): DuplicateAlignment {
  const minOverlap = Math.max(1, Math.ceil(MIN_OVERLAP_SHARE * Math.min(hashes.length, others.length)));
  let best: { shift: number; mean: number } | null = null;
  for (let shift = -(hashes.length - 1); shift <= others.length - 1; shift += 1) {
    const mean = meanDistance(hashes, others, shift, minOverlap);
    if (mean === null) continue;
    if (best === null || mean < best.mean || (mean === best.mean && Math.abs(shift) < Math.abs(best.shift))) {
      best = { shift, mean };
    }
  }
  const shift = best?.shift ?? 0;
  const steps = hashes.map((hash, index) => {
    const otherIndex = index + shift;
    const inRange = otherIndex >= 0 && otherIndex < others.length;
    const other = inRange ? others[otherIndex] : null;
    return {
      index,
      otherIndex: inRange ? otherIndex : null,
      distance: hash !== null && other !== null && other !== undefined ? hexHashDistance(hash, other) : null,
    };
  });
  return { shift, steps, meanDistance: best?.mean ?? null };
}

/** Mean distance of the pairs (i, i + shift) where both hashes exist; null below `minOverlap` such pairs. */
function meanDistance(
  hashes: readonly (string | null)[],
  others: readonly (string | null)[],
  shift: number,
  minOverlap: number,
): number | null {
  let sum = 0;
  let count = 0;
  for (let i = Math.max(0, -shift); i < hashes.length && i + shift < others.length; i += 1) {
    const a = hashes[i];
    const b = others[i + shift];
    if (a === null || a === undefined || b === null || b === undefined) continue;
    sum += hexHashDistance(a, b);
    count += 1;
  }
  return count >= minOverlap ? sum / count : null;
}
