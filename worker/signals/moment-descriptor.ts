/**
 * The two parts of a moment descriptor (shared/diversity/descriptor-layout.ts), pure functions over typed arrays.
 * - Colour statistics in CIE L*a*b* (D65) through shared/colour/srgb-lab.ts.
 * - Gradient orientation histogram after Dalal & Triggs, "Histograms of oriented gradients for human detection",
 *   CVPR 2005 [M]: central differences [−1, 0, 1], unsigned orientation, votes weighted by the gradient magnitude,
 *   over the whole frame (one cell), interior pixels only. 8 bins instead of their 9: enough for scene layout.
 * - Motion: the same kind of histogram over the direction of the flow vectors of known pixels.
 */
import { rgbImageToLab } from '../../shared/colour/srgb-lab';
import {
  APPEARANCE_DIMS,
  DIRECTION_BINS,
  MOTION_DIMS,
  ORIENTATION_BINS,
} from '../../shared/diversity/descriptor-layout';
import { isUnknownFlow } from '../../shared/motion/unknown-flow';

/** Colour statistics, gradient orientation and ln(1 + sharpness) of one frame. */
export function appearanceDescriptor(
  rgb: Uint8Array,
  grey: Float32Array,
  width: number,
  height: number,
  sharpness: number,
): Float32Array {
  const out = new Float32Array(APPEARANCE_DIMS);
  const pixels = width * height;
  const lab = { l: new Float32Array(pixels), a: new Float32Array(pixels), b: new Float32Array(pixels) };
  rgbImageToLab(rgb, lab);
  [lab.l, lab.a, lab.b].forEach((plane, c) => {
    const { mean, sd } = meanAndSd(plane);
    out[c] = mean;
    out[3 + c] = sd;
  });
  out.set(orientationHistogram(grey, width, height), 6);
  out[6 + ORIENTATION_BINS] = Math.log1p(Math.max(0, sharpness));
  return out;
}

/** Magnitude-weighted histogram of unsigned gradient orientation, [0, π) in equal bins, summing to 1 (or all 0). */
export function orientationHistogram(grey: Float32Array, width: number, height: number): Float64Array {
  const bins = new Float64Array(ORIENTATION_BINS);
  let total = 0;
  for (let y = 1; y < height - 1; y += 1) {
    for (let x = 1; x < width - 1; x += 1) {
      const p = y * width + x;
      const gx = grey[p + 1]! - grey[p - 1]!;
      const gy = grey[p + width]! - grey[p - width]!;
      const magnitude = Math.hypot(gx, gy);
      if (magnitude === 0) continue;
      let angle = Math.atan2(gy, gx);
      // Unsigned: θ and θ ± π are one orientation, folded into [0, π).
      if (angle < 0) angle += Math.PI;
      if (angle >= Math.PI) angle -= Math.PI;
      bins[binOf(angle / Math.PI, ORIENTATION_BINS)] += magnitude;
      total += magnitude;
    }
  }
  return normalise(bins, total);
}

/** ln(1 + mean magnitude) and the magnitude-weighted direction histogram over [−π, π) of an interleaved field. */
export function motionDescriptor(flow: Float32Array): Float32Array {
  const out = new Float32Array(MOTION_DIMS);
  const bins = new Float64Array(DIRECTION_BINS);
  let total = 0;
  let known = 0;
  for (let p = 0; p < flow.length; p += 2) {
    const u = flow[p]!;
    const v = flow[p + 1]!;
    if (isUnknownFlow(u, v)) continue;
    known += 1;
    const magnitude = Math.hypot(u, v);
    if (magnitude === 0) continue;
    bins[binOf((Math.atan2(v, u) + Math.PI) / (2 * Math.PI), DIRECTION_BINS)] += magnitude;
    total += magnitude;
  }
  out[0] = Math.log1p(known > 0 ? total / known : 0);
  out.set(normalise(bins, total), 1);
  return out;
}

/** The bin of a position in [0, 1]; 1 itself (π exactly) goes into the last bin. */
function binOf(position: number, bins: number): number {
  return Math.min(bins - 1, Math.max(0, Math.floor(position * bins)));
}

function normalise(bins: Float64Array, total: number): Float64Array {
  if (total > 0) for (let i = 0; i < bins.length; i += 1) bins[i] /= total;
  return bins;
}

function meanAndSd(plane: Float32Array): { mean: number; sd: number } {
  let sum = 0;
  for (const value of plane) sum += value;
  const mean = sum / plane.length;
  let squares = 0;
  for (const value of plane) squares += (value - mean) ** 2;
  return { mean, sd: Math.sqrt(squares / plane.length) };
}
