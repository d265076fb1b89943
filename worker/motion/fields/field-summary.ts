// Everything Kinefold stores about one motion field besides the field itself: the statistics of
// field-statistics.ts, the global motion (median vector) and the largest magnitude.
// The global motion is the median u and the median v over known pixels, each the nearest-rank median (the
// ⌈N/2⌉-th smallest, as field-statistics.ts takes percentiles): a camera's own motion moves most pixels alike, so
// the median follows it and ignores objects that move on their own over less than half the picture.

import { maxMotionRadius } from '../../../shared/motion/colour-wheel.js';
import { isUnknownFlow } from '../../../shared/motion/unknown-flow.js';
import { consistentP95Magnitude } from './consistent-magnitude.js';
import { fieldStatistics, nearestRankPercentile } from './field-statistics.js';

const MEDIAN = 0.5;

export interface FieldSummary {
  meanMagnitude: number;
  p95Magnitude: number;
  /** The same percentile over consistent pixels only (consistent-magnitude.ts); it sets the colour scale. */
  consistentP95Magnitude: number;
  consistentShare: number;
  medianU: number;
  medianV: number;
  maxMagnitude: number;
}

/** The median vector of an interleaved (u, v) field over known pixels; (0, 0) when none is known. */
export function medianMotion(flow: Float32Array, scratch: Float32Array): { medianU: number; medianV: number } {
  const pixels = flow.length >> 1;
  if (scratch.length < pixels) throw new Error(`median motion: scratch needs ${pixels} floats`);
  const component = (offset: number): number => {
    let count = 0;
    for (let p = 0; p < pixels; p++) {
      if (!isUnknownFlow(flow[2 * p], flow[2 * p + 1])) scratch[count++] = flow[2 * p + offset];
    }
    return nearestRankPercentile(scratch, count, MEDIAN);
  };
  return { medianU: component(0), medianV: component(1) };
}

/** Summary of `flow` with its consistency `mask` (one byte per pixel); `scratch` holds one float per pixel. */
export function summariseField(flow: Float32Array, mask: Uint8Array, scratch: Float32Array): FieldSummary {
  const statistics = fieldStatistics(flow, mask, scratch);
  return {
    meanMagnitude: statistics.meanMagnitude,
    p95Magnitude: statistics.p95Magnitude,
    consistentP95Magnitude: consistentP95Magnitude(flow, mask, scratch),
    consistentShare: statistics.consistentShare ?? 0,
    ...medianMotion(flow, scratch),
    maxMagnitude: maxMotionRadius(flow),
  };
}
