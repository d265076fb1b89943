// The iteration of Farnebäck's method: per-pixel normal equations from the two polynomial expansions and the
// current motion, averaged over a window, then solved for a new motion. Source: G. Farnebäck, "Two-Frame Motion
// Estimation Based on Polynomial Expansion", SCIA 2003; a port of FarnebackUpdateMatrices,
// FarnebackUpdateFlow_Blur and FarnebackUpdateFlow_GaussianBlur in OpenCV's video/src/optflowgf.cpp.
// OpenCV interleaves matrix updates with the window pass in stripes that trail the pass by more than the window,
// so every matrix row is updated only after its last read; a full pass followed by a full update, as here, gives
// the same numbers.

import { POLY_CHANNELS } from './poly-exp.js';

const C = POLY_CHANNELS; // M also holds five values per pixel: G11, G12, G22, h1, h2
const BORDER = 5;
// OpenCV's down-weighting of the five pixels nearest each edge, where the expansions are least reliable.
const BORDER_WEIGHTS = Float32Array.from([0.14, 0.14, 0.4472, 0.4472, 0.4472]);
// Added to the 2×2 determinant so textureless windows give small, finite motion.
const DETERMINANT_REGULARISER = 1e-3;
// OpenCV's Gaussian window: σ = 0.3 · half-window.
const WINDOW_SIGMA_PER_RADIUS = 0.3;

/**
 * Builds M (5 values per pixel) from the expansions R0 of the first frame, R1 of the second and the current
 * motion: R1 is read bilinearly at x + flow(x), then A = (A0 + A1)/2 and Δb = −(b1 − b0)/2 + A·flow.
 * Rows firstRow to lastRow − 1 only, when given.
 */
export function updateMatrices(
  r0: Float32Array,
  r1: Float32Array,
  flow: Float32Array,
  matrices: Float32Array,
  width: number,
  height: number,
  firstRow = 0,
  lastRow = height,
): void {
  const step = width * C;
  for (let y = firstRow; y < lastRow; y++) {
    const yInside = y >= BORDER && y < height - BORDER;
    const yWeight = y < BORDER ? BORDER_WEIGHTS[y] : y >= height - BORDER ? BORDER_WEIGHTS[height - y - 1] : 1;
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      const dx = flow[2 * p];
      const dy = flow[2 * p + 1];
      const fx0 = x + dx;
      const fy0 = y + dy;
      const x1 = Math.floor(fx0);
      const y1 = Math.floor(fy0);
      const fx = fx0 - x1;
      const fy = fy0 - y1;
      const o = p * C;
      const b0y = r0[o];
      const b0x = r0[o + 1];
      let r2 = 0;
      let r3 = 0;
      let r4: number;
      let r5: number;
      let r6: number;
      if (x1 >= 0 && x1 < width - 1 && y1 >= 0 && y1 < height - 1) {
        const a00 = Math.fround((1 - fx) * (1 - fy));
        const a01 = Math.fround(fx * (1 - fy));
        const a10 = Math.fround((1 - fx) * fy);
        const a11 = Math.fround(fx * fy);
        const q = y1 * step + x1 * C;
        const q2 = q + step;
        r2 = a00 * r1[q] + a01 * r1[q + C] + a10 * r1[q2] + a11 * r1[q2 + C];
        r3 = a00 * r1[q + 1] + a01 * r1[q + C + 1] + a10 * r1[q2 + 1] + a11 * r1[q2 + C + 1];
        r4 = (r0[o + 2] + (a00 * r1[q + 2] + a01 * r1[q + C + 2] + a10 * r1[q2 + 2] + a11 * r1[q2 + C + 2])) * 0.5;
        r5 = (r0[o + 3] + (a00 * r1[q + 3] + a01 * r1[q + C + 3] + a10 * r1[q2 + 3] + a11 * r1[q2 + C + 3])) * 0.5;
        r6 = (r0[o + 4] + (a00 * r1[q + 4] + a01 * r1[q + C + 4] + a10 * r1[q2 + 4] + a11 * r1[q2 + C + 4])) * 0.25;
      } else {
        // The displaced point left the frame: no second-frame information.
        r4 = r0[o + 2];
        r5 = r0[o + 3];
        r6 = r0[o + 4] * 0.5;
      }
      r2 = (b0y - r2) * 0.5;
      r3 = (b0x - r3) * 0.5;
      r2 += r4 * dy + r6 * dx;
      r3 += r6 * dy + r5 * dx;
      if (!yInside || x < BORDER || x >= width - BORDER) {
        const scale =
          yWeight * (x < BORDER ? BORDER_WEIGHTS[x] : 1) * (x >= width - BORDER ? BORDER_WEIGHTS[width - x - 1] : 1);
        r2 *= scale;
        r3 *= scale;
        r4 *= scale;
        r5 *= scale;
        r6 *= scale;
      }
      matrices[o] = r4 * r4 + r6 * r6;
      matrices[o + 1] = (r4 + r5) * r6;
      matrices[o + 2] = r5 * r5 + r6 * r6;
      matrices[o + 3] = r4 * r2 + r6 * r3;
      matrices[o + 4] = r6 * r2 + r5 * r3;
    }
  }
}

/** Solves the windowed 2×2 system at one pixel and writes (u, v). */
function solveInto(flow: Float32Array, p: number, g11: number, g12: number, g22: number, h1: number, h2: number): void {
  const inverseDet = 1 / (g11 * g22 - g12 * g12 + DETERMINANT_REGULARISER);
  flow[2 * p] = (g11 * h2 - g12 * h1) * inverseDet;
  flow[2 * p + 1] = (g22 * h1 - g12 * h2) * inverseDet;
}

/** Recomputes the matrix rows firstRow to lastRow − 1 from the new motion, for the next iteration. */
export type MatrixRefresh = (firstRow: number, lastRow: number) => void;

/**
 * Box window (OpenCV's default): running sums over (2m+1)² pixels, m = ⌊blockSize/2⌋, edge rows and columns
 * repeated, divided by blockSize² as OpenCV does. `columnSums` needs (width + 2m + 2)·5 doubles.
 * With `refresh`, each matrix row is recomputed as soon as the running sums have read it for the last time,
 * m + 1 rows behind the solve (OpenCV's stripes), while it is still in cache; the numbers are those of a full
 * solve followed by a full update.
 */
export function solveFlowBox(
  matrices: Float32Array,
  flow: Float32Array,
  width: number,
  height: number,
  blockSize: number,
  columnSums: Float64Array,
  refresh?: MatrixRefresh,
): void {
  const m = blockSize >> 1;
  const scale = 1 / (blockSize * blockSize);
  const rowLength = width * C;
  const pad = (m + 1) * C;
  const vsum = columnSums;
  // Start as if rows above the frame repeated row 0; the first step adds row m and drops one copy of row 0.
  for (let x = 0; x < rowLength; x++) vsum[pad + x] = matrices[x] * (m + 2);
  for (let y = 1; y < m; y++) {
    const row = Math.min(y, height - 1) * rowLength;
    for (let x = 0; x < rowLength; x++) vsum[pad + x] += matrices[row + x];
  }
  for (let y = 0; y < height; y++) {
    const leaving = Math.max(y - m - 1, 0) * rowLength;
    const entering = Math.min(y + m, height - 1) * rowLength;
    slideColumnSums(vsum, pad, matrices, entering, leaving, rowLength);
    for (let x = 0; x < pad; x++) {
      vsum[pad - 1 - x] = vsum[pad + C - 1 - (x % C)];
      vsum[pad + rowLength + x] = vsum[pad + rowLength - C + (x % C)];
    }
    let g11 = vsum[pad] * (m + 2);
    let g12 = vsum[pad + 1] * (m + 2);
    let g22 = vsum[pad + 2] * (m + 2);
    let h1 = vsum[pad + 3] * (m + 2);
    let h2 = vsum[pad + 4] * (m + 2);
    for (let x = 1; x < m; x++) {
      const i = pad + x * C;
      g11 += vsum[i];
      g12 += vsum[i + 1];
      g22 += vsum[i + 2];
      h1 += vsum[i + 3];
      h2 += vsum[i + 4];
    }
    for (let x = 0; x < width; x++) {
      const enter = pad + (x + m) * C;
      const leave = pad + (x - m) * C - C;
      g11 += vsum[enter] - vsum[leave];
      g12 += vsum[enter + 1] - vsum[leave + 1];
      g22 += vsum[enter + 2] - vsum[leave + 2];
      h1 += vsum[enter + 3] - vsum[leave + 3];
      h2 += vsum[enter + 4] - vsum[leave + 4];
      solveInto(flow, y * width + x, g11 * scale, g12 * scale, g22 * scale, h1 * scale, h2 * scale);
    }
    // Row y − m − 1 left the running sums at this step (row 0 leaves last at step m + 1).
    if (refresh !== undefined && y - m - 1 >= 0) refresh(y - m - 1, y - m);
  }
  // The last m + 1 rows are read as entering rows until the end.
  if (refresh !== undefined) refresh(Math.max(height - m - 1, 0), height);
}

/**
 * Moves `length` column sums from `from` down one row: sums[from + i] += M[entering + i] − M[leaving + i]. One
 * pixel (5 values) per iteration, written out: measured under half the time of the plain loop over values.
 */
function slideColumnSums(
  sums: Float64Array,
  from: number,
  matrices: Float32Array,
  entering: number,
  leaving: number,
  length: number,
): void {
  for (let i = from, e = entering, l = leaving, end = from + length; i < end; i += C, e += C, l += C) {
    sums[i] += matrices[e] - matrices[l];
    sums[i + 1] += matrices[e + 1] - matrices[l + 1];
    sums[i + 2] += matrices[e + 2] - matrices[l + 2];
    sums[i + 3] += matrices[e + 3] - matrices[l + 3];
    sums[i + 4] += matrices[e + 4] - matrices[l + 4];
  }
}

/** The normalised one-sided Gaussian window of OpenCV's FarnebackUpdateFlow_GaussianBlur (index 0 = centre). */
export function gaussianWindow(blockSize: number): Float32Array {
  const m = blockSize >> 1;
  const sigma = m * WINDOW_SIGMA_PER_RADIUS;
  const kernel = new Float32Array(m + 1);
  kernel[0] = 1;
  let sum = 1;
  for (let i = 1; i <= m; i++) {
    kernel[i] = Math.exp((-i * i) / (2 * sigma * sigma));
    sum += kernel[i] * 2;
  }
  for (let i = 0; i <= m; i++) kernel[i] = kernel[i] / sum;
  return kernel;
}

/**
 * Gaussian window (OpenCV's OPTFLOW_FARNEBACK_GAUSSIAN), edges repeated. `columnSums` needs (width + 2m)·5
 * floats and `rowSums` width·5 floats, m = ⌊blockSize/2⌋.
 */
export function solveFlowGaussian(
  matrices: Float32Array,
  flow: Float32Array,
  width: number,
  height: number,
  kernel: Float32Array,
  columnSums: Float32Array,
  rowSums: Float32Array,
): void {
  const m = kernel.length - 1;
  const rowLength = width * C;
  const pad = m * C;
  const vsum = columnSums;
  for (let y = 0; y < height; y++) {
    const centre = y * rowLength;
    for (let x = 0; x < rowLength; x++) vsum[pad + x] = matrices[centre + x] * kernel[0];
    for (let i = 1; i <= m; i++) {
      const below = Math.min(y + i, height - 1) * rowLength;
      const above = Math.max(y - i, 0) * rowLength;
      const weight = kernel[i];
      for (let x = 0; x < rowLength; x++) vsum[pad + x] += (matrices[below + x] + matrices[above + x]) * weight;
    }
    for (let x = 0; x < pad; x++) {
      vsum[pad - 1 - x] = vsum[pad + C - 1 - (x % C)];
      vsum[pad + rowLength + x] = vsum[pad + rowLength - C + (x % C)];
    }
    for (let x = 0; x < rowLength; x++) {
      let sum = vsum[pad + x] * kernel[0];
      for (let i = 1; i <= m; i++) sum += kernel[i] * (vsum[pad + x - i * C] + vsum[pad + x + i * C]);
      rowSums[x] = sum;
    }
    for (let x = 0; x < width; x++) {
      const i = x * C;
      solveInto(flow, y * width + x, rowSums[i], rowSums[i + 1], rowSums[i + 2], rowSums[i + 3], rowSums[i + 4]);
    }
  }
}
