// Image pyramid levels: sizes and smoothed, downscaled copies of a frame.
// Follows OpenCV's Farnebäck pyramid (video/src/optflowgf.cpp, calc()): level k has scale s = pyrScale^k and size
// round(w·s) × round(h·s); it is made from the full-resolution frame by a Gaussian blur with σ = (1/s − 1)/2
// over max(round(5σ) | 1, 3) taps, then a bilinear resize. Levels stop before a side would drop under 32 px.
// The blur is computed only at the rows and columns the resize reads, which gives the same values as blurring
// the whole frame first at a fraction of the cost on coarse levels.

import { filterAtEdge, filterColumnsAt, gaussianBlur, gaussianKernel } from './gaussian-blur.js';
import { resizeAxis } from './resample.js';
import type { MotionWorkspace } from './workspace.js';

/** OpenCV's smallest level side for Farnebäck (`min_size`). */
export const MIN_LEVEL_SIDE = 32;
const SIGMA_PER_SCALE_STEP = 0.5;
const TAPS_PER_SIGMA = 5;
const MIN_TAPS = 3;

export interface PyramidLevel {
  width: number;
  height: number;
  /** Size relative to the full frame (pyrScale^k). */
  scale: number;
}

/** Rounds half to even, like OpenCV's cvRound (lrint in the default rounding mode). */
export function roundHalfEven(value: number): number {
  const floor = Math.floor(value);
  const diff = value - floor;
  if (diff > 0.5) return floor + 1;
  if (diff < 0.5) return floor;
  return floor % 2 === 0 ? floor : floor + 1;
}

/**
 * Levels from finest (index 0, the frame itself) to coarsest. At most `levels` levels are added above the frame,
 * fewer when a side would drop under `minSide`.
 */
export function pyramidLevels(
  width: number,
  height: number,
  levels: number,
  pyrScale: number,
  minSide = MIN_LEVEL_SIDE,
): PyramidLevel[] {
  let count = 0;
  let scale = 1;
  for (; count < levels; count++) {
    scale *= pyrScale;
    if (width * scale < minSide || height * scale < minSide) break;
  }
  const result: PyramidLevel[] = [];
  for (let k = 0; k <= count; k++) {
    // Repeated multiplication, as OpenCV does, so scales match it bit for bit.
    let s = 1;
    for (let i = 0; i < k; i++) s *= pyrScale;
    result.push({ width: roundHalfEven(width * s), height: roundHalfEven(height * s), scale: s });
  }
  return result;
}

/** The pre-smoothing kernel for a level of the given scale. */
export function levelKernel(scale: number): Float32Array {
  const sigma = (1 / scale - 1) * SIGMA_PER_SCALE_STEP;
  const taps = Math.max(roundHalfEven(sigma * TAPS_PER_SIGMA) | 1, MIN_TAPS);
  return gaussianKernel(taps, sigma);
}

/**
 * Horizontal filter (symmetric kernel) of one source row, evaluated only at the listed columns (in increasing
 * order). Columns away from the ends are done four at a time, each summed in its own order as alone, so the
 * chains of dependent additions overlap.
 */
function filterRowAt(
  src: Float32Array,
  rowStart: number,
  width: number,
  kernel: Float32Array,
  columns: Int32Array,
  out: Float32Array,
  outStart: number,
): void {
  const radius = kernel.length >> 1;
  const centre = kernel[radius];
  const count = columns.length;
  let c = 0;
  for (; c < count && columns[c] < radius; c++) {
    out[outStart + c] = filterAtEdge(src, rowStart, width, kernel, columns[c]);
  }
  let end = count;
  while (end > c && columns[end - 1] >= width - radius) end--;
  for (; c + 3 < end; c += 4) {
    const a0 = rowStart + columns[c];
    const a1 = rowStart + columns[c + 1];
    const a2 = rowStart + columns[c + 2];
    const a3 = rowStart + columns[c + 3];
    let s0 = centre * src[a0];
    let s1 = centre * src[a1];
    let s2 = centre * src[a2];
    let s3 = centre * src[a3];
    for (let i = 1; i <= radius; i++) {
      const k = kernel[radius + i];
      s0 += k * (src[a0 - i] + src[a0 + i]);
      s1 += k * (src[a1 - i] + src[a1 + i]);
      s2 += k * (src[a2 - i] + src[a2 + i]);
      s3 += k * (src[a3 - i] + src[a3 + i]);
    }
    out[outStart + c] = s0;
    out[outStart + c + 1] = s1;
    out[outStart + c + 2] = s2;
    out[outStart + c + 3] = s3;
  }
  for (; c < count; c++) out[outStart + c] = filterAtEdge(src, rowStart, width, kernel, columns[c]);
}

/**
 * Writes pyramid level `level` of a full-resolution frame into `dst` (level.width × level.height). Uses the
 * workspace buffers "pyramid.*" and "blur.rows".
 */
export function buildLevel(
  frame: Float32Array,
  width: number,
  height: number,
  level: PyramidLevel,
  dst: Float32Array,
  workspace: MotionWorkspace,
): void {
  const kernel = levelKernel(level.scale);
  if (level.width === width && level.height === height) {
    // OpenCV's resize copies when the size does not change, so this level is the blur alone.
    gaussianBlur(frame, dst, width, height, kernel, workspace);
    return;
  }
  const xs = resizeAxis(width, level.width);
  const ys = resizeAxis(height, level.height);
  // Columns read by the resize: each output column reads its left neighbour and the one after it.
  const columns = new Int32Array(2 * level.width);
  for (let dx = 0; dx < level.width; dx++) {
    columns[2 * dx] = xs.index[dx];
    columns[2 * dx + 1] = Math.min(xs.index[dx] + 1, width - 1);
  }
  const stride = columns.length;
  const rowFiltered = workspace.float32('pyramid.rows', stride * height);
  for (let y = 0; y < height; y++) filterRowAt(frame, y * width, width, kernel, columns, rowFiltered, y * stride);

  const blurredTop = workspace.float32('pyramid.top', stride);
  const blurredBottom = workspace.float32('pyramid.bottom', stride);
  for (let dy = 0; dy < level.height; dy++) {
    const y0 = ys.index[dy];
    const y1 = Math.min(y0 + 1, height - 1);
    filterColumnsAt(rowFiltered, stride, height, kernel, y0, blurredTop, 0);
    filterColumnsAt(rowFiltered, stride, height, kernel, y1, blurredBottom, 0);
    const fy = ys.weight[dy];
    const outRow = dy * level.width;
    for (let dx = 0; dx < level.width; dx++) {
      const fx = xs.weight[dx];
      const top = blurredTop[2 * dx] * (1 - fx) + blurredTop[2 * dx + 1] * fx;
      const bottom = blurredBottom[2 * dx] * (1 - fx) + blurredBottom[2 * dx + 1] * fx;
      dst[outRow + dx] = top * (1 - fy) + bottom * fy;
    }
  }
}
