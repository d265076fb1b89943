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

/** The filtered value at one position of a row, with the row's ends reflected (BORDER_REFLECT_101). */
export function filterAtEdge(
  src: Float32Array,
  rowStart: number,
  width: number,
  kernel: Float32Array,
  x: number,
): number {
  const radius = kernel.length >> 1;
  let sum = kernel[radius] * src[rowStart + x];
  for (let i = 1; i <= radius; i++) {
    const left = src[rowStart + reflect101(x - i, width)];
    sum += kernel[radius + i] * (left + src[rowStart + reflect101(x + i, width)]);
  }
  return sum;
}

/**
 * Filters one row of `src` (starting at `rowStart`) with the symmetric `kernel` into `out` (from `outStart`),
 * pairing the taps on either side of the centre. Away from the ends four outputs are summed side by side, each
 * in the same order as alone, so the chains of dependent additions overlap.
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
  const innerEnd = Math.max(width - radius, radius);
  for (let x = 0; x < Math.min(radius, width); x++) out[outStart + x] = filterAtEdge(src, rowStart, width, kernel, x);
  let x = radius;
  for (; x + 3 < innerEnd; x += 4) {
    const at = rowStart + x;
    let s0 = centre * src[at];
    let s1 = centre * src[at + 1];
    let s2 = centre * src[at + 2];
    let s3 = centre * src[at + 3];
    for (let i = 1; i <= radius; i++) {
      const k = kernel[radius + i];
      s0 += k * (src[at - i] + src[at + i]);
      s1 += k * (src[at + 1 - i] + src[at + 1 + i]);
      s2 += k * (src[at + 2 - i] + src[at + 2 + i]);
      s3 += k * (src[at + 3 - i] + src[at + 3 + i]);
    }
    out[outStart + x] = s0;
    out[outStart + x + 1] = s1;
    out[outStart + x + 2] = s2;
    out[outStart + x + 3] = s3;
  }
  for (; x < innerEnd; x++) {
    const at = rowStart + x;
    let sum = centre * src[at];
    for (let i = 1; i <= radius; i++) sum += kernel[radius + i] * (src[at - i] + src[at + i]);
    out[outStart + x] = sum;
  }
  for (x = Math.max(innerEnd, Math.min(radius, width)); x < width; x++) {
    out[outStart + x] = filterAtEdge(src, rowStart, width, kernel, x);
  }
}

/**
 * Filters the columns of `rows` (row length `stride`, `height` rows) at row `y` with the symmetric `kernel`
 * into `out` from `outStart`. Each output is summed in a register, rounded to single precision after every tap
 * as accumulating in the Float32Array output would be, so results do not depend on the loop order.
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
  if (y >= radius && y < height - radius) {
    // Four columns side by side, each summed in its own order, so the chains of dependent additions overlap.
    let c = 0;
    for (; c + 3 < stride; c += 4) {
      const at = middle + c;
      let s0 = Math.fround(centre * rows[at]);
      let s1 = Math.fround(centre * rows[at + 1]);
      let s2 = Math.fround(centre * rows[at + 2]);
      let s3 = Math.fround(centre * rows[at + 3]);
      let offset = stride;
      for (let i = 1; i <= radius; i++, offset += stride) {
        const k = kernel[radius + i];
        const a = at - offset;
        const b = at + offset;
        s0 = Math.fround(s0 + k * (rows[a] + rows[b]));
        s1 = Math.fround(s1 + k * (rows[a + 1] + rows[b + 1]));
        s2 = Math.fround(s2 + k * (rows[a + 2] + rows[b + 2]));
        s3 = Math.fround(s3 + k * (rows[a + 3] + rows[b + 3]));
      }
      out[outStart + c] = s0;
      out[outStart + c + 1] = s1;
      out[outStart + c + 2] = s2;
      out[outStart + c + 3] = s3;
    }
    for (; c < stride; c++) {
      const at = middle + c;
      let sum = Math.fround(centre * rows[at]);
      let offset = stride;
      for (let i = 1; i <= radius; i++, offset += stride) {
        sum = Math.fround(sum + kernel[radius + i] * (rows[at - offset] + rows[at + offset]));
      }
      out[outStart + c] = sum;
    }
    return;
  }
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
