// Polynomial expansion, the first step of Farnebäck's method: at every pixel, a quadratic polynomial
// f(x) ≈ xᵀAx + bᵀx + c fitted to the neighbourhood by Gaussian-weighted least squares, computed with separable
// filters. Source: G. Farnebäck, "Two-Frame Motion Estimation Based on Polynomial Expansion", SCIA 2003; a port
// of FarnebackPrepareGaussian and FarnebackPolyExp in OpenCV's video/src/optflowgf.cpp, including its border
// (the edge pixel repeated) and its channel order, so results can be compared with OpenCV pixel by pixel.

/** Coefficients per pixel, in OpenCV's order: b_y, b_x, a_yy, a_xx, a_xy. */
export const POLY_CHANNELS = 5;
const RAW_CHANNELS = 3; // per-row vertical filter results: g, x·g, x²·g
const FLT_EPSILON = 1.1920929e-7;
const DEFAULT_SIGMA_PER_TAP = 0.3;

/** Filter taps for one side of the window (index 0 is the centre) and the needed entries of G⁻¹. */
export interface PolyExpansionConstants {
  n: number;
  g: Float32Array;
  xg: Float32Array;
  xxg: Float32Array;
  ig11: number;
  ig03: number;
  ig33: number;
  ig55: number;
}

/**
 * Taps and the inverse of the 6×6 normal-equation matrix G for basis {1, x, y, x², y², xy}. G has only a 3×3
 * block {1, x², y²} that is not diagonal, so the needed entries of G⁻¹ are written out rather than factorised.
 */
export function polyExpansionConstants(n: number, sigma: number): PolyExpansionConstants {
  const s = sigma < FLT_EPSILON ? n * DEFAULT_SIGMA_PER_TAP : sigma;
  const g = new Float32Array(n + 1);
  const xg = new Float32Array(n + 1);
  const xxg = new Float32Array(n + 1);
  let sum = 0;
  for (let x = -n; x <= n; x++) sum += Math.fround(Math.exp((-x * x) / (2 * s * s)));
  const inverseSum = 1 / sum;
  for (let x = 0; x <= n; x++) {
    g[x] = Math.fround(Math.exp((-x * x) / (2 * s * s))) * inverseSum;
    xg[x] = x * g[x];
    xxg[x] = x * x * g[x];
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
  return {
    n,
    g,
    xg,
    xxg,
    ig11: 1 / g11,
    ig03: (-g11 * (g33 - g55)) / det,
    ig33: (g00 * g33 - g11 * g11) / det,
    ig55: 1 / g55,
  };
}

/** Floats `polyExpand` needs in its row buffer for a frame `width` wide. */
export function polyRowBufferLength(width: number, n: number): number {
  return RAW_CHANNELS * (width + 2 * n);
}

/**
 * Expands `src` (width × height) into `dst` (5 values per pixel). `rowBuffer` holds polyRowBufferLength floats.
 * The three vertical results of a row are interleaved per pixel in the row buffer (as OpenCV does) and the
 * three taps per offset in one small table, so the horizontal loop reads from two arrays; the arithmetic and
 * its order are OpenCV's.
 */
export function polyExpand(
  src: Float32Array,
  width: number,
  height: number,
  constants: PolyExpansionConstants,
  dst: Float32Array,
  rowBuffer: Float32Array,
): void {
  const { n, g, xg, xxg, ig11, ig03, ig33, ig55 } = constants;
  // Entry n + x is pixel x: g, y·g, y²·g sums; the n entries on each side repeat the edge pixel.
  const raw = rowBuffer;
  const taps = new Float64Array(3 * (n + 1));
  for (let k = 0; k <= n; k++) {
    taps[3 * k] = g[k];
    taps[3 * k + 1] = xg[k];
    taps[3 * k + 2] = xxg[k];
  }
  const g0 = g[0];
  const rowsAbove = new Int32Array(n + 1);
  const rowsBelow = new Int32Array(n + 1);
  for (let y = 0; y < height; y++) {
    for (let k = 1; k <= n; k++) {
      rowsAbove[k] = Math.max(y - k, 0) * width;
      rowsBelow[k] = Math.min(y + k, height - 1) * width;
    }
    verticalSums(src, y * width, width, n, taps, g0, rowsAbove, rowsBelow, raw);
    const last = RAW_CHANNELS * (n + width - 1);
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < RAW_CHANNELS; c++) {
        raw[RAW_CHANNELS * i + c] = raw[RAW_CHANNELS * n + c];
        raw[RAW_CHANNELS * (n + width + i) + c] = raw[last + c];
      }
    }
    // Horizontal part: the six filter products, then G⁻¹ gives the polynomial coefficients.
    const out = y * width * POLY_CHANNELS;
    for (let x = 0; x < width; x++) {
      const i = RAW_CHANNELS * (n + x);
      let b1 = raw[i] * g0;
      let b2 = 0;
      let b3 = raw[i + 1] * g0;
      let b4 = 0;
      let b5 = raw[i + 2] * g0;
      let b6 = 0;
      for (let k = 1, d = RAW_CHANNELS; k <= n; k++, d += RAW_CHANNELS) {
        const gk = taps[3 * k];
        const xgk = taps[3 * k + 1];
        const right = raw[i + d];
        const left = raw[i - d];
        const slopeRight = raw[i + d + 1];
        const slopeLeft = raw[i - d + 1];
        const tg = right + left;
        b1 += tg * gk;
        b4 += tg * taps[3 * k + 2];
        b2 += (right - left) * xgk;
        b3 += (slopeRight + slopeLeft) * gk;
        b6 += (slopeRight - slopeLeft) * xgk;
        b5 += (raw[i + d + 2] + raw[i - d + 2]) * gk;
      }
      const o = out + x * POLY_CHANNELS;
      dst[o] = b3 * ig11;
      dst[o + 1] = b2 * ig11;
      dst[o + 2] = b1 * ig03 + b5 * ig33;
      dst[o + 3] = b1 * ig03 + b4 * ig33;
      dst[o + 4] = b6 * ig55;
    }
  }
}

/**
 * Vertical part of one row: g, y·g and y²·g down each column (rows above and below given, edge rows repeated),
 * written interleaved from entry n. Each sum is kept in a register and rounded to single precision after every
 * tap, as accumulating in the Float32Array row buffer would be; two columns at a time so the chains of
 * dependent additions overlap.
 */
function verticalSums(
  src: Float32Array,
  centre: number,
  width: number,
  n: number,
  taps: Float64Array,
  g0: number,
  rowsAbove: Int32Array,
  rowsBelow: Int32Array,
  raw: Float32Array,
): void {
  const f = Math.fround;
  let x = 0;
  for (; x + 1 < width; x += 2) {
    let s0 = f(src[centre + x] * g0);
    let s1 = f(src[centre + x + 1] * g0);
    let t0 = 0;
    let t1 = 0;
    let c0 = 0;
    let c1 = 0;
    for (let k = 1; k <= n; k++) {
      const gk = taps[3 * k];
      const xgk = taps[3 * k + 1];
      const xxgk = taps[3 * k + 2];
      const above = rowsAbove[k] + x;
      const below = rowsBelow[k] + x;
      const a0 = src[above];
      const b0 = src[below];
      const a1 = src[above + 1];
      const b1 = src[below + 1];
      s0 = f(s0 + gk * (a0 + b0));
      s1 = f(s1 + gk * (a1 + b1));
      t0 = f(t0 + xgk * (b0 - a0));
      t1 = f(t1 + xgk * (b1 - a1));
      c0 = f(c0 + xxgk * (a0 + b0));
      c1 = f(c1 + xxgk * (a1 + b1));
    }
    const o = RAW_CHANNELS * (n + x);
    raw[o] = s0;
    raw[o + 1] = t0;
    raw[o + 2] = c0;
    raw[o + 3] = s1;
    raw[o + 4] = t1;
    raw[o + 5] = c1;
  }
  for (; x < width; x++) {
    let s0 = f(src[centre + x] * g0);
    let t0 = 0;
    let c0 = 0;
    for (let k = 1; k <= n; k++) {
      const a = src[rowsAbove[k] + x];
      const b = src[rowsBelow[k] + x];
      s0 = f(s0 + taps[3 * k] * (a + b));
      t0 = f(t0 + taps[3 * k + 1] * (b - a));
      c0 = f(c0 + taps[3 * k + 2] * (a + b));
    }
    const o = RAW_CHANNELS * (n + x);
    raw[o] = s0;
    raw[o + 1] = t0;
    raw[o + 2] = c0;
  }
}
