// The data term of DIS's variational refinement: brightness constancy and gradient constancy, each under a
// robust (Charbonnier) penalty and normalised by the local gradient strength, linearised around the field the
// level starts with. Sources: T. Brox, A. Bruhn, N. Papenberg, J. Weickert, "High Accuracy Optical Flow
// Estimation Based on a Theory for Warping", ECCV 2004 (the energy); T. Kroeger et al., "Fast Optical Flow
// using Dense Inverse Search", ECCV 2016, where it is the last step of every level; the normalisation,
// constants and derivative filters of OpenCV's VariationalRefinement (video/src/variational_refinement.cpp):
// derivatives are plain differences I(x+1) − I(x−1) (its Sobel with ksize 1), which its weights are tuned for.

import { warpPlanar } from '../kernels/resample.js';
import type { MotionWorkspace } from '../kernels/workspace.js';

/** OpenCV's ζ (normalisation floor, grey levels per pixel) and ε (Charbonnier smoothing). */
export const ZETA = 0.1;
export const EPSILON = 0.001;

/**
 * Per pixel, each constancy equation pre-divided by the square root of its normaliser so that the penalties
 * become plain squares: Ix, Iy, Iz over √nc; Ixx, Ixy, Ixz over √nx; Ixy, Iyy, Iyz over √ny, with
 * nc = Ix² + Iy² + ζ², nx = Ixx² + Ixy² + ζ², ny = Iyy² + Ixy² + ζ² (OpenCV's derivNorm and derivNorm2).
 */
export const DATA_TERMS = 9;

function differenceX(src: Float32Array, w: number, h: number, dst: Float32Array): void {
  for (let y = 0; y < h; y++) {
    const row = y * w;
    if (w === 1) {
      dst[row] = 0;
      continue;
    }
    dst[row] = src[row + 1] - src[row];
    for (let x = 1; x < w - 1; x++) dst[row + x] = src[row + x + 1] - src[row + x - 1];
    dst[row + w - 1] = src[row + w - 1] - src[row + w - 2];
  }
}

function differenceY(src: Float32Array, w: number, h: number, dst: Float32Array): void {
  for (let y = 0; y < h; y++) {
    const up = (y > 0 ? y - 1 : 0) * w;
    const down = (y < h - 1 ? y + 1 : y) * w;
    const row = y * w;
    for (let x = 0; x < w; x++) dst[row + x] = src[down + x] - src[up + x];
  }
}

/**
 * Fills `terms` (DATA_TERMS per pixel) for frames prev, next and the starting field (u, v): derivatives of the
 * mean of prev and the warped next frame, and the temporal difference. Uses workspace buffers "dis.data.*".
 */
export function dataTerms(
  prev: Float32Array,
  next: Float32Array,
  w: number,
  h: number,
  u: Float32Array,
  v: Float32Array,
  workspace: MotionWorkspace,
  terms: Float32Array,
): void {
  const pixels = w * h;
  const warped = workspace.float32('dis.data.warped', pixels);
  const mean = workspace.float32('dis.data.mean', pixels);
  const ix = workspace.float32('dis.data.ix', pixels);
  const iy = workspace.float32('dis.data.iy', pixels);
  warpPlanar(next, w, h, u, v, warped);
  for (let p = 0; p < pixels; p++) {
    mean[p] = 0.5 * (prev[p] + warped[p]);
    warped[p] -= prev[p]; // from here on, Iz
  }
  const iz = warped;
  differenceX(mean, w, h, ix);
  differenceY(mean, w, h, iy);
  const zeta2 = ZETA * ZETA;
  // The second derivatives are differences of the first ones taken here, with the rule of differenceX and
  // differenceY at the edges (one-sided), rather than in passes of their own.
  for (let y = 0; y < h; y++) {
    const up = (y > 0 ? y - 1 : 0) * w;
    const down = (y < h - 1 ? y + 1 : y) * w;
    const row = y * w;
    for (let x = 0; x < w; x++) {
      const p = row + x;
      const before = x > 0 ? p - 1 : p;
      const after = x < w - 1 ? p + 1 : p;
      const gx = ix[p];
      const gy = iy[p];
      const xx = ix[after] - ix[before];
      const xy = ix[down + x] - ix[up + x];
      const yy = iy[down + x] - iy[up + x];
      const xz = iz[after] - iz[before];
      const yz = iz[down + x] - iz[up + x];
      const colourScale = 1 / Math.sqrt(gx * gx + gy * gy + zeta2);
      const xScale = 1 / Math.sqrt(xx * xx + xy * xy + zeta2);
      const yScale = 1 / Math.sqrt(yy * yy + xy * xy + zeta2);
      const qxx = xx * xScale;
      const qxy = xy * xScale;
      const qxz = xz * xScale;
      const rxy = xy * yScale;
      const ryy = yy * yScale;
      const ryz = yz * yScale;
      const t = DATA_TERMS * p;
      terms[t] = gx * colourScale;
      terms[t + 1] = gy * colourScale;
      terms[t + 2] = iz[p] * colourScale;
      terms[t + 3] = qxx;
      terms[t + 4] = qxy;
      terms[t + 5] = qxz;
      terms[t + 6] = rxy;
      terms[t + 7] = ryy;
      terms[t + 8] = ryz;
    }
  }
}
