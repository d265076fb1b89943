// Image and field helpers for the DIS estimator: the area pyramid (each level the 2×2 block mean of the one
// below, as OpenCV's DISOpticalFlow builds it with INTER_AREA), the second frame with a replicated border so
// patch reads need no bounds checks, first derivatives for the patch search, backward warping and upsampling of
// planar (u, v) fields. All edges repeat the edge pixel.

import { resampleBufferLength, resampleField, resizeAxis } from '../kernels/resample.js';

/** Side of a pyramid level: each level halves the one below, rounding down. */
export function levelSide(side: number, scale: number): number {
  return Math.floor(side / 2 ** scale);
}

/** dst (⌊sw/2⌋ × ⌊sh/2⌋) = mean of each 2×2 block of src; an odd last row or column is dropped. */
export function halveArea(src: Float32Array, sw: number, sh: number, dst: Float32Array): void {
  const dw = sw >> 1;
  const dh = sh >> 1;
  for (let y = 0; y < dh; y++) {
    const top = 2 * y * sw;
    const bottom = top + sw;
    const row = y * dw;
    for (let x = 0; x < dw; x++) {
      const i = 2 * x;
      dst[row + x] = 0.25 * (src[top + i] + src[top + i + 1] + src[bottom + i] + src[bottom + i + 1]);
    }
  }
}

/** dst ((w + 2b) × (h + 2b)) = src with `border` pixels on every side repeating the edge pixel. */
export function padReplicate(src: Float32Array, w: number, h: number, border: number, dst: Float32Array): void {
  const pw = w + 2 * border;
  for (let y = -border; y < h + border; y++) {
    const from = (y < 0 ? 0 : y >= h ? h - 1 : y) * w;
    const to = (y + border) * pw;
    const first = src[from];
    const last = src[from + w - 1];
    for (let x = 0; x < border; x++) dst[to + x] = first;
    dst.set(src.subarray(from, from + w), to + border);
    for (let x = border + w; x < pw; x++) dst[to + x] = last;
  }
}

/**
 * The first frame as the patch search reads it: per pixel I, ∂I/∂x, ∂I/∂y, interleaved. The derivatives are the
 * 3×3 Sobel operator scaled to unit gain ([1, 2, 1]/4 across, [−1, 0, 1]/2 along), so a ramp of slope 1 gives 1
 * and a Gauss–Newton step on them is in pixels, as in the DIS authors' code (tikroeger/OF_DIS, run_dense.cpp:
 * Sobel with scale 1/8).
 */
export function patchSource(image: Float32Array, w: number, h: number, out: Float32Array): void {
  for (let y = 0; y < h; y++) {
    const row = y * w;
    const up = (y > 0 ? y - 1 : 0) * w;
    const down = (y < h - 1 ? y + 1 : y) * w;
    for (let x = 0; x < w; x++) {
      const l = x > 0 ? x - 1 : 0;
      const r = x < w - 1 ? x + 1 : x;
      const right = image[up + r] + 2 * image[row + r] + image[down + r];
      const left = image[up + l] + 2 * image[row + l] + image[down + l];
      const below = image[down + l] + 2 * image[down + x] + image[down + r];
      const above = image[up + l] + 2 * image[up + x] + image[up + r];
      const o = 3 * (row + x);
      out[o] = image[row + x];
      out[o + 1] = (right - left) * 0.125;
      out[o + 2] = (below - above) * 0.125;
    }
  }
}

/** Floats upsampleFlow needs in its `lines` buffer. */
export function upsampleBufferLength(dstWidth: number): number {
  return resampleBufferLength(dstWidth);
}

/**
 * Bilinear upsampling of a planar field by `factor` (a power of two, the ratio between pyramid levels):
 * destination pixel x reads the source at (x + ½)/factor − ½, clamped to the source, and the vectors are
 * multiplied by `factor` (resample.ts resampleField; `lines` holds upsampleBufferLength floats). The ratio is
 * exactly 1/factor even where a level's side was rounded down.
 * u goes to dstU[i·step] and v to dstV[i·step]; pass `out` and `out.subarray(1)` with step 2 for an interleaved
 * result.
 */
export function upsampleFlow(
  u: Float32Array,
  v: Float32Array,
  sw: number,
  sh: number,
  factor: number,
  lines: Float32Array,
  dstU: Float32Array,
  dstV: Float32Array,
  dw: number,
  dh: number,
  step: number,
): void {
  const ratio = 1 / factor;
  const xs = resizeAxis(sw, dw, ratio);
  const ys = resizeAxis(sh, dh, ratio);
  resampleField({ u, v, step: 1 }, sw, sh, { u: dstU, v: dstV, step }, dw, dh, xs, ys, factor, factor, lines);
}
