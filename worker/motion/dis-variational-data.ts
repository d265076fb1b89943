// The data term of DIS's variational refinement: brightness constancy and gradient constancy, each under a
// robust (Charbonnier) penalty and normalised by the local gradient strength, linearised around the field the
// level starts with. Sources: T. Brox, A. Bruhn, N. Papenberg, J. Weickert, "High Accuracy Optical Flow
// Estimation Based on a Theory for Warping", ECCV 2004 (the energy); T. Kroeger et al., "Fast Optical Flow
// using Dense Inverse Search", ECCV 2016 (§2.2, used as the last step of every level); the normalisation,
// constants and derivative filters of OpenCV's VariationalRefinement (video/src/variational_refinement.cpp):
// derivatives are plain differences I(x+1) − I(x−1) (its Sobel with ksize 1), which its weights are tuned for.

import { warpPlanar } from './dis-levels.js';
import type { MotionWorkspace } from './workspace.js';

/** OpenCV's ζ (normalisation floor, grey levels per pixel) and ε (Charbonnier smoothing). */
export const ZETA = 0.1;
export const EPSILON = 0.001;

/**
 * Per pixel: Ix, Iy, Iz, 1/nc, Ixx, Ixy, Iyy, Ixz, Iyz, 1/nx, 1/ny, then the gradient-constancy products
 * (Ixx²/nx + Ixy²/ny, Ixx·Ixy/nx + Ixy·Iyy/ny, Ixy²/nx + Iyy²/ny, Ixx·Ixz/nx + Ixy·Iyz/ny,
 * Ixy·Ixz/nx + Iyy·Iyz/ny), with nc = Ix² + Iy² + ζ², nx = Ixx² + Ixy² + ζ², ny = Iyy² + Ixy² + ζ².
 */
export const DATA_TERMS = 16;

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
  const dzx = workspace.float32('dis.data.dzx', pixels);
  warpPlanar(next, w, h, u, v, warped);
  for (let p = 0; p < pixels; p++) {
    mean[p] = 0.5 * (prev[p] + warped[p]);
    warped[p] -= prev[p]; // from here on, Iz
  }
  const iz = warped;
  differenceX(mean, w, h, ix);
  differenceY(mean, w, h, iy);
  // The mean is no longer needed: its buffer takes ∂Ix/∂x.
  const ixx = mean;
  differenceX(ix, w, h, ixx);
  differenceX(iz, w, h, dzx);
  const zeta2 = ZETA * ZETA;
  for (let y = 0; y < h; y++) {
    const up = (y > 0 ? y - 1 : 0) * w;
    const down = (y < h - 1 ? y + 1 : y) * w;
    const row = y * w;
    for (let x = 0; x < w; x++) {
      const p = row + x;
      const gx = ix[p];
      const gy = iy[p];
      const xx = ixx[p];
      const xy = ix[down + x] - ix[up + x];
      const yy = iy[down + x] - iy[up + x];
      const xz = dzx[p];
      const yz = iz[down + x] - iz[up + x];
      const inverseX = 1 / (xx * xx + xy * xy + zeta2);
      const inverseY = 1 / (yy * yy + xy * xy + zeta2);
      const t = DATA_TERMS * p;
      terms[t] = gx;
      terms[t + 1] = gy;
      terms[t + 2] = iz[p];
      terms[t + 3] = 1 / (gx * gx + gy * gy + zeta2);
      terms[t + 4] = xx;
      terms[t + 5] = xy;
      terms[t + 6] = yy;
      terms[t + 7] = xz;
      terms[t + 8] = yz;
      terms[t + 9] = inverseX;
      terms[t + 10] = inverseY;
      terms[t + 11] = xx * xx * inverseX + xy * xy * inverseY;
      terms[t + 12] = xx * xy * inverseX + xy * yy * inverseY;
      terms[t + 13] = xy * xy * inverseX + yy * yy * inverseY;
      terms[t + 14] = xx * xz * inverseX + xy * yz * inverseY;
      terms[t + 15] = xy * xz * inverseX + yy * yz * inverseY;
    }
  }
}
