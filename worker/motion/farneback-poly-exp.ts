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
 * The three vertical results are kept in separate planes of the row buffer (OpenCV interleaves them), which
 * keeps the horizontal loop's reads contiguous; the arithmetic is OpenCV's.
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
  const planeLength = width + 2 * n;
  // Plane index n + x is pixel x; the n entries on each side repeat the edge pixel.
  const smooth = rowBuffer.subarray(0, planeLength);
  const slopeY = rowBuffer.subarray(planeLength, 2 * planeLength);
  const curveY = rowBuffer.subarray(2 * planeLength, 3 * planeLength);
  const g0 = g[0];
  for (let y = 0; y < height; y++) {
    // Vertical part: g, y·g and y²·g down the column, edge rows repeated.
    const centre = y * width;
    for (let x = 0; x < width; x++) {
      smooth[n + x] = src[centre + x] * g0;
      slopeY[n + x] = 0;
      curveY[n + x] = 0;
    }
    for (let k = 1; k <= n; k++) {
      const gk = g[k];
      const xgk = xg[k];
      const xxgk = xxg[k];
      const above = Math.max(y - k, 0) * width;
      const below = Math.min(y + k, height - 1) * width;
      for (let x = 0; x < width; x++) {
        const a = src[above + x];
        const b = src[below + x];
        const sum = a + b;
        smooth[n + x] += gk * sum;
        slopeY[n + x] += xgk * (b - a);
        curveY[n + x] += xxgk * sum;
      }
    }
    for (let i = 0; i < n; i++) {
      smooth[i] = smooth[n];
      slopeY[i] = slopeY[n];
      curveY[i] = curveY[n];
      smooth[n + width + i] = smooth[n + width - 1];
      slopeY[n + width + i] = slopeY[n + width - 1];
      curveY[n + width + i] = curveY[n + width - 1];
    }
    // Horizontal part: the six filter products, then G⁻¹ gives the polynomial coefficients.
    const out = y * width * POLY_CHANNELS;
    for (let x = 0; x < width; x++) {
      const i = n + x;
      let b1 = smooth[i] * g0;
      let b2 = 0;
      let b3 = slopeY[i] * g0;
      let b4 = 0;
      let b5 = curveY[i] * g0;
      let b6 = 0;
      for (let k = 1; k <= n; k++) {
        const gk = g[k];
        const xgk = xg[k];
        const right = smooth[i + k];
        const left = smooth[i - k];
        const slopeRight = slopeY[i + k];
        const slopeLeft = slopeY[i - k];
        const tg = right + left;
        b1 += tg * gk;
        b4 += tg * xxg[k];
        b2 += (right - left) * xgk;
        b3 += (slopeRight + slopeLeft) * gk;
        b6 += (slopeRight - slopeLeft) * xgk;
        b5 += (curveY[i + k] + curveY[i - k]) * gk;
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
