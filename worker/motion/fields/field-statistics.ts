// Summary figures of one motion field, stored with it and charted per frame: mean and 95th-percentile motion
// magnitude, and the share of pixels the forward–backward check found consistent.
// Percentile method: nearest rank, the ⌈p·N⌉-th smallest of N magnitudes (common practice; no interpolation, so
// the result is always one of the measured magnitudes), found with quickselect rather than a full sort.
// Unknown pixels are left out.

import { isUnknownFlow } from '../../../shared/motion/unknown-flow.js';

export const P95 = 0.95;

export interface FieldStatistics {
  /** Mean |(u, v)| over known pixels, in pixels. */
  meanMagnitude: number;
  /** Nearest-rank 95th percentile of |(u, v)| over known pixels. */
  p95Magnitude: number;
  /** Share of pixels marked consistent in the mask; null when no mask was given. */
  consistentShare: number | null;
  /** Known pixels counted. */
  count: number;
}

/** Nearest-rank percentile of the first `count` values of `values` (reordered in place). */
export function nearestRankPercentile(values: Float32Array, count: number, p: number): number {
  if (count === 0) return 0;
  const rank = Math.min(count, Math.max(1, Math.ceil(p * count)));
  return quickselect(values, count, rank - 1);
}

/** The k-th smallest (0-based) of the first `count` values; Hoare partition around the middle element. */
function quickselect(values: Float32Array, count: number, k: number): number {
  let low = 0;
  let high = count - 1;
  while (low < high) {
    const pivot = values[(low + high) >> 1];
    let i = low;
    let j = high;
    while (i <= j) {
      while (values[i] < pivot) i++;
      while (values[j] > pivot) j--;
      if (i <= j) {
        const t = values[i];
        values[i] = values[j];
        values[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) high = j;
    else if (k >= i) low = i;
    else return values[k];
  }
  return values[k];
}

/**
 * Statistics of an interleaved (u, v) field. `scratch` (at least one float per pixel) avoids an allocation;
 * `mask` is a consistency mask of one byte per pixel.
 */
export function fieldStatistics(flow: Float32Array, mask?: Uint8Array, scratch?: Float32Array): FieldStatistics {
  const pixels = flow.length >> 1;
  if (mask !== undefined && mask.length !== pixels) {
    throw new Error(`field statistics: mask holds ${mask.length} bytes, ${pixels} needed`);
  }
  const magnitudes = scratch ?? new Float32Array(pixels);
  if (magnitudes.length < pixels) throw new Error(`field statistics: scratch needs ${pixels} floats`);
  let count = 0;
  let sum = 0;
  for (let p = 0; p < pixels; p++) {
    const u = flow[2 * p];
    const v = flow[2 * p + 1];
    if (isUnknownFlow(u, v)) continue;
    const magnitude = Math.sqrt(u * u + v * v);
    magnitudes[count++] = magnitude;
    sum += magnitude;
  }
  let consistentShare: number | null = null;
  if (mask !== undefined) {
    let consistent = 0;
    for (let p = 0; p < pixels; p++) if (mask[p] !== 0) consistent++;
    consistentShare = pixels === 0 ? 0 : consistent / pixels;
  }
  return {
    meanMagnitude: count === 0 ? 0 : sum / count,
    p95Magnitude: nearestRankPercentile(magnitudes, count, P95),
    consistentShare,
    count,
  };
}
