// Separable Gaussian smoothing of a single-channel Float32Array image.
// Kernel and border follow OpenCV's getGaussianKernel and GaussianBlur (imgproc/smooth.dispatch.cpp): the fixed
// small kernels for sigma ≤ 0, otherwise exp(−x²/2σ²) normalised; borders reflect without repeating the edge
// pixel (BORDER_REFLECT_101: …, 2, 1 | 0, 1, 2, …). Rows are filtered first, then columns, as OpenCV does.
// Gaussian kernels are symmetric, so the filters add the two pixels that share a weight before multiplying.

import type { MotionWorkspace } from './workspace.js';

// getGaussianKernel's table for sigma ≤ 0 and odd sizes up to 7.
const SMALL_KERNELS: Readonly<Record<number, readonly number[]>> = {
  1: [1],
  3: [0.25, 0.5, 0.25],
  5: [0.0625, 0.25, 0.375, 0.25, 0.0625],
  7: [0.03125, 0.109375, 0.21875, 0.28125, 0.21875, 0.109375, 0.03125],
};
// getGaussianKernel's sigma for a size when none is given: 0.3·((size − 1)/2 − 1) + 0.8.
const AUTO_SIGMA_SCALE = 0.3;
const AUTO_SIGMA_OFFSET = 0.8;

/** A normalised odd-sized Gaussian kernel; sigma ≤ 0 picks one from the size, as OpenCV does. */
export function gaussianKernel(size: number, sigma: number): Float32Array {
  if (!Number.isInteger(size) || size < 1 || size % 2 === 0) {
    throw new Error(`Gaussian kernel size must be a positive odd integer, got ${size}`);
  }
  const small = SMALL_KERNELS[size];
  if (sigma <= 0 && small !== undefined) return Float32Array.from(small);
  const s = sigma > 0 ? sigma : AUTO_SIGMA_SCALE * ((size - 1) / 2 - 1) + AUTO_SIGMA_OFFSET;
  const radius = (size - 1) / 2;
  const weights = new Float64Array(size);
  let sum = 0;
  for (let i = 0; i < size; i++) {
    const x = i - radius;
    weights[i] = Math.exp((-x * x) / (2 * s * s));
    sum += weights[i];
  }
  const kernel = new Float32Array(size);
  for (let i = 0; i < size; i++) kernel[i] = weights[i] / sum;
  return kernel;
}

/** Index of a pixel outside 0..n−1 under BORDER_REFLECT_101 (n ≥ 2); inside, the index itself. */
export function reflect101(i: number, n: number): number {
  if (n === 1) return 0;
  let j = i;
  // Loop for kernels longer than the image, where one reflection is not enough.
  while (j < 0 || j >= n) j = j < 0 ? -j : 2 * n - 2 - j;
  return j;
}

/**
 * Filters one row of `src` (starting at `rowStart`) with the symmetric `kernel` into `out` (from `outStart`),
 * pairing the taps on either side of the centre.
 */
function filterRow(
  src: Float32Array,
  rowStart: number,
  width: number,
  kernel: Float32Array,
  out: Float32Array,
  outStart: number,
): void {
  const radius = kernel.length >> 1;
  const centre = kernel[radius];
  const innerEnd = width - radius;
  for (let x = 0; x < width; x++) {
    let sum = centre * src[rowStart + x];
    if (x >= radius && x < innerEnd) {
      const at = rowStart + x;
      for (let i = 1; i <= radius; i++) sum += kernel[radius + i] * (src[at - i] + src[at + i]);
    } else {
      for (let i = 1; i <= radius; i++) {
        const left = src[rowStart + reflect101(x - i, width)];
        sum += kernel[radius + i] * (left + src[rowStart + reflect101(x + i, width)]);
      }
    }
    out[outStart + x] = sum;
  }
}

/**
 * Filters the columns of `rows` (row length `stride`, `height` rows) at row `y` with the symmetric `kernel`
 * into `out` from `outStart`.
 */
export function filterColumnsAt(
  rows: Float32Array,
  stride: number,
  height: number,
  kernel: Float32Array,
  y: number,
  out: Float32Array,
  outStart: number,
): void {
  const radius = kernel.length >> 1;
  const centre = kernel[radius];
  const middle = y * stride;
  for (let c = 0; c < stride; c++) out[outStart + c] = centre * rows[middle + c];
  for (let i = 1; i <= radius; i++) {
    const weight = kernel[radius + i];
    const above = reflect101(y - i, height) * stride;
    const below = reflect101(y + i, height) * stride;
    for (let c = 0; c < stride; c++) out[outStart + c] += weight * (rows[above + c] + rows[below + c]);
  }
}

/**
 * Blurs `src` into `dst` (may be the same array) with the separable, symmetric `kernel`. Uses the workspace
 * buffer "blur.rows" for the row-filtered image.
 */
export function gaussianBlur(
  src: Float32Array,
  dst: Float32Array,
  width: number,
  height: number,
  kernel: Float32Array,
  workspace: MotionWorkspace,
): void {
  const rows = workspace.float32('blur.rows', width * height);
  for (let y = 0; y < height; y++) filterRow(src, y * width, width, kernel, rows, y * width);
  for (let y = 0; y < height; y++) filterColumnsAt(rows, width, height, kernel, y, dst, y * width);
}
