// Polynomial expansion, the first step of Farnebäck's method: at every pixel, a quadratic polynomial
// f(x) ≈ xᵀAx + bᵀx + c fitted to the neighbourhood by Gaussian-weighted least squares, computed with separable
// filters. Source: G. Farnebäck, "Two-Frame Motion Estimation Based on Polynomial Expansion", SCIA 2003; a port
// of FarnebackPrepareGaussian and FarnebackPolyExp in OpenCV's video/src/optflowgf.cpp, including its border
// (the edge pixel repeated) and its channel order, so results can be compared with OpenCV pixel by pixel.

/** Coefficients per pixel, in OpenCV's order: b_y, b_x, a_yy, a_xx, a_xy. */
export const POLY_CHANNELS = 5;
const RAW_CHANNELS = 3; // per-row vertical filter results, see polyExpand
const FLT_EPSILON = 1.1920929e-7;
const DEFAULT_SIGMA_PER_TAP = 0.3;

/**
 * Filter taps for one side of the window (index 0 is the centre) and the needed entries of G⁻¹. The two
 * diagonal coefficients a_yy, a_xx are G⁻¹-weighted sums of two filter responses each; since filtering is linear,
 * those sums are folded into one `mixed` kernel, g·(G⁻¹)₀₃ + x²g·(G⁻¹)₃₃, so each takes one filter instead of two.
 */
export interface PolyExpansionConstants {
  n: number;
  g: Float64Array;
  xg: Float64Array;
  mixed: Float64Array;
  ig11: number;
  ig55: number;
}

/**
 * Taps and the inverse of the 6×6 normal-equation matrix G for basis {1, x, y, x², y², xy}. G has only a 3×3
 * block {1, x², y²} that is not diagonal, so the needed entries of G⁻¹ are written out rather than factorised.
 */
export function polyExpansionConstants(n: number, sigma: number): PolyExpansionConstants {
  const s = sigma < FLT_EPSILON ? n * DEFAULT_SIGMA_PER_TAP : sigma;
  const g = new Float64Array(n + 1);
  const xg = new Float64Array(n + 1);
  const xxg = new Float64Array(n + 1);
  let sum = 0;
  for (let x = -n; x <= n; x++) sum += Math.fround(Math.exp((-x * x) / (2 * s * s)));
  const inverseSum = 1 / sum;
  // Taps rounded to single precision, as OpenCV keeps them.
  for (let x = 0; x <= n; x++) {
    g[x] = Math.fround(Math.fround(Math.exp((-x * x) / (2 * s * s))) * inverseSum);
    xg[x] = Math.fround(x * g[x]);
    xxg[x] = Math.fround(x * x * g[x]);
  }
  let g00 = 0;
  let g11 = 0;
  let g33 = 0;
  let g55 = 0;
  const f32 = Math.fround; // OpenCV forms these products in single precision before summing in double
  for (let y = -n; y <= n; y++) {
    for (let x = -n; x <= n; x++) {
      const w = f32(g[Math.abs(y)] * g[Math.abs(x)]);
      const wxx = f32(f32(w * x) * x);
      g00 += w;
      g11 += wxx;
      g33 += f32(f32(wxx * x) * x);
      g55 += f32(f32(wxx * y) * y);
    }
  }
  // Block {1, x², y²} = [[a, b, b], [b, c, d], [b, d, c]] with a = G00, b = G11, c = G33, d = G55.
  const det = (g33 - g55) * (g00 * (g33 + g55) - 2 * g11 * g11);
  const ig03 = (-g11 * (g33 - g55)) / det;
  const ig33 = (g00 * g33 - g11 * g11) / det;
  const mixed = new Float64Array(n + 1);
  for (let x = 0; x <= n; x++) mixed[x] = g[x] * ig03 + xxg[x] * ig33;
  return { n, g, xg, mixed, ig11: 1 / g11, ig55: 1 / g55 };
}

/** Doubles `polyExpand` needs in its row buffer for a frame `width` wide. */
export function polyRowBufferLength(width: number, n: number): number {
  return RAW_CHANNELS * (width + 2 * n);
}

/**
 * Expands `src` (width × height) into `dst` (5 values per pixel). `rowBuffer` holds polyRowBufferLength doubles.
 * Separable, as OpenCV's FarnebackPolyExp: per image row, three vertical filters of the columns (g, y·g and
 * `mixed`), interleaved per pixel in the row buffer with the edge values repeated n times on each side, then
 * five horizontal filters of that row. OpenCV computes six (with x²·g and y²·g) and mixes them afterwards;
 * folding the mix into the kernels gives the same coefficients up to rounding with 15% fewer operations.
 */
export function polyExpand(
  src: Float32Array,
  width: number,
  height: number,
  constants: PolyExpansionConstants,
  dst: Float32Array,
  rowBuffer: Float64Array,
): void {
  const { n } = constants;
  const rowsAbove = new Int32Array(n + 1);
  const rowsBelow = new Int32Array(n + 1);
  for (let y = 0; y < height; y++) {
    for (let k = 1; k <= n; k++) {
      rowsAbove[k] = Math.max(y - k, 0) * width;
      rowsBelow[k] = Math.min(y + k, height - 1) * width;
    }
    verticalSums(src, y * width, width, constants, rowsAbove, rowsBelow, rowBuffer);
    repeatRowEnds(rowBuffer, width, n);
    horizontalSums(rowBuffer, width, constants, dst, y * width * POLY_CHANNELS);
  }
}

/**
 * Vertical part of one row: g, y·g and `mixed` down each column (rows above and below given, edge rows
 * repeated), written interleaved from entry n. Two columns at a time so the chains of dependent additions
 * overlap.
 */
function verticalSums(
  src: Float32Array,
  centre: number,
  width: number,
  constants: PolyExpansionConstants,
  rowsAbove: Int32Array,
  rowsBelow: Int32Array,
  raw: Float64Array,
): void {
  const { n, g, xg, mixed } = constants;
  const g0 = g[0];
  const m0 = mixed[0];
  let x = 0;
  for (; x + 1 < width; x += 2) {
    const c0 = src[centre + x];
    const c1 = src[centre + x + 1];
    let s0 = c0 * g0;
    let s1 = c1 * g0;
    let t0 = 0;
    let t1 = 0;
    let q0 = c0 * m0;
    let q1 = c1 * m0;
    for (let k = 1; k <= n; k++) {
      const gk = g[k];
      const xgk = xg[k];
      const mk = mixed[k];
      const above = rowsAbove[k] + x;
      const below = rowsBelow[k] + x;
      const a0 = src[above];
      const b0 = src[below];
      const a1 = src[above + 1];
      const b1 = src[below + 1];
      const p0 = a0 + b0;
      const p1 = a1 + b1;
      s0 += gk * p0;
      s1 += gk * p1;
      t0 += xgk * (b0 - a0);
      t1 += xgk * (b1 - a1);
      q0 += mk * p0;
      q1 += mk * p1;
    }
    const o = RAW_CHANNELS * (n + x);
    raw[o] = s0;
    raw[o + 1] = t0;
    raw[o + 2] = q0;
    raw[o + 3] = s1;
    raw[o + 4] = t1;
    raw[o + 5] = q1;
  }
  for (; x < width; x++) {
    const c0 = src[centre + x];
    let s0 = c0 * g0;
    let t0 = 0;
    let q0 = c0 * m0;
    for (let k = 1; k <= n; k++) {
      const a = src[rowsAbove[k] + x];
      const b = src[rowsBelow[k] + x];
      s0 += g[k] * (a + b);
      t0 += xg[k] * (b - a);
      q0 += mixed[k] * (a + b);
    }
    const o = RAW_CHANNELS * (n + x);
    raw[o] = s0;
    raw[o + 1] = t0;
    raw[o + 2] = q0;
  }
}

/** Repeats the first and last pixel's three values into the n entries on each side of the row buffer. */
function repeatRowEnds(raw: Float64Array, width: number, n: number): void {
  const first = RAW_CHANNELS * n;
  const last = RAW_CHANNELS * (n + width - 1);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < RAW_CHANNELS; c++) {
      raw[RAW_CHANNELS * i + c] = raw[first + c];
      raw[RAW_CHANNELS * (n + width + i) + c] = raw[last + c];
    }
  }
}

/**
 * Horizontal part of one row: from the vertical g sums (entry 0 of a pixel) x·g and `mixed` give b_x and a_xx;
 * from the y·g sums (entry 1) g and x·g give b_y and a_xy; from the `mixed` sums (entry 2) g gives a_yy.
 */
function horizontalSums(
  raw: Float64Array,
  width: number,
  constants: PolyExpansionConstants,
  dst: Float32Array,
  out: number,
): void {
  const { n, g, xg, mixed, ig11, ig55 } = constants;
  const g0 = g[0];
  const m0 = mixed[0];
  for (let x = 0, i = RAW_CHANNELS * n, o = out; x < width; x++, i += RAW_CHANNELS, o += POLY_CHANNELS) {
    let by = raw[i + 1] * g0;
    let bx = 0;
    let ayy = raw[i + 2] * g0;
    let axx = raw[i] * m0;
    let axy = 0;
    for (let k = 1, r = i + RAW_CHANNELS, l = i - RAW_CHANNELS; k <= n; k++, r += RAW_CHANNELS, l -= RAW_CHANNELS) {
      const gk = g[k];
      const xgk = xg[k];
      const right = raw[r];
      const left = raw[l];
      const slopeRight = raw[r + 1];
      const slopeLeft = raw[l + 1];
      axx += (right + left) * mixed[k];
      bx += (right - left) * xgk;
      by += (slopeRight + slopeLeft) * gk;
      axy += (slopeRight - slopeLeft) * xgk;
      ayy += (raw[r + 2] + raw[l + 2]) * gk;
    }
    dst[o] = by * ig11;
    dst[o + 1] = bx * ig11;
    dst[o + 2] = ayy;
    dst[o + 3] = axx;
    dst[o + 4] = axy * ig55;
  }
}
