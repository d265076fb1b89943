// The speed a field shows where it can be trusted: the nearest-rank 95th percentile of |(u, v)| over the pixels
// that pass the forward–backward check and are known. The clip's motion colour scale is taken from it
// (shared/motion/motion-scale.ts), so occlusions, flat areas and pairs matched by force do not set the scale.

import { isUnknownFlow } from '../../../shared/motion/unknown-flow.js';
import { nearestRankPercentile, P95 } from './field-statistics.js';

/** 0 when no pixel passes. `scratch` holds at least one float per pixel and is overwritten. */
export function consistentP95Magnitude(flow: Float32Array, mask: Uint8Array, scratch: Float32Array): number {
  const pixels = flow.length >> 1;
  if (mask.length !== pixels) {
    throw new Error(`consistent magnitude: mask holds ${mask.length} bytes, ${pixels} needed`);
  }
  if (scratch.length < pixels) throw new Error(`consistent magnitude: scratch needs ${pixels} floats`);
  let count = 0;
  for (let p = 0; p < pixels; p++) {
    const u = flow[2 * p];
    const v = flow[2 * p + 1];
    if (mask[p] !== 0 && !isUnknownFlow(u, v)) scratch[count++] = Math.sqrt(u * u + v * v);
  }
  return nearestRankPercentile(scratch, count, P95);
}
