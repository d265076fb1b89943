// Horn–Schunck dense motion estimation: brightness constancy plus a global smoothness term weighted by alpha,
// solved by Jacobi iterations, here coarse-to-fine with warping so that motions of several pixels are found.
// Source: B. K. P. Horn, B. G. Schunck, "Determining Optical Flow", Artificial Intelligence 17, 1981 (the
// iteration u = ū − Ix(Ix ū + Iy v̄ + It)/(α² + Ix² + Iy²) and its neighbour weights 1/6 and 1/12); warping as
// in Brox et al., "High Accuracy Optical Flow Estimation Based on a Theory for Warping", ECCV 2004, with the
// derivatives of the average of the first frame and the warped second frame.

import { coarseToFine, type LevelFrames } from '../kernels/coarse-to-fine.js';
import { centralDifferences } from '../kernels/derivatives.js';
import { assertFramePair, outputField } from '../kernels/estimator-input.js';
import { warpBackward } from '../kernels/resample.js';
import { MotionWorkspace } from '../kernels/workspace.js';
import { estimatorParamsProblem } from '../../../shared/schemas/project-settings';

export interface HornSchunckParams {
  /** Smoothness weight in grey levels (0..255 frames): larger gives smoother fields. */
  alpha: number;
  /** Jacobi iterations after each warp. */
  iterations: number;
  /** Warps (re-linearisations) per pyramid level. */
  warps: number;
  /** Pyramid levels above the frame (fewer when a side would drop under 32 px). */
  levels: number;
  /** Size ratio between pyramid levels, in (0, 1). */
  pyrScale: number;
}

/** Defaults chosen on Kinefold's generated pairs and Grove3 (see tests/unit/motion for the figures). */
export const HORN_SCHUNCK_DEFAULTS: Readonly<HornSchunckParams> = Object.freeze({
  alpha: 15,
  iterations: 40,
  warps: 2,
  levels: 3,
  pyrScale: 0.5,
});

// Horn & Schunck's Laplacian weights: edge neighbours 1/6, corner neighbours 1/12.
const EDGE_WEIGHT = 1 / 6;
const CORNER_WEIGHT = 1 / 12;

/** Checks the parameters against their ranges (shared/schemas/project-settings.ts, also used when a project is saved). */
export function validateHornSchunckParams(params: HornSchunckParams): void {
  const problem = estimatorParamsProblem('horn-schunck', params);
  if (problem) throw new Error(problem);
}

/**
 * Per pixel, the linearised constraint Ix·u + Iy·v + c = 0 around the current field and the gains
 * Ix/(α² + Ix² + Iy²), Iy/(…) of the Jacobi update. `terms` holds 5 values per pixel: Ix, Iy, c, gainX, gainY.
 */
function linearise(frames: LevelFrames, flow: Float32Array, alpha: number, terms: Float32Array, ws: MotionWorkspace) {
  const { width, height, prev, next } = frames;
  const pixels = width * height;
  const warped = ws.float32('hs.warped', pixels);
  const mean = ws.float32('hs.mean', pixels);
  const ix = ws.float32('hs.ix', pixels);
  const iy = ws.float32('hs.iy', pixels);
  warpBackward(next, width, height, flow, warped);
  for (let p = 0; p < pixels; p++) mean[p] = 0.5 * (prev[p] + warped[p]);
  centralDifferences(mean, width, height, ix, iy);
  const alpha2 = alpha * alpha;
  for (let p = 0; p < pixels; p++) {
    const gx = ix[p];
    const gy = iy[p];
    const it = warped[p] - prev[p];
    const denominator = alpha2 + gx * gx + gy * gy;
    const t = 5 * p;
    terms[t] = gx;
    terms[t + 1] = gy;
    terms[t + 2] = it - gx * flow[2 * p] - gy * flow[2 * p + 1];
    terms[t + 3] = gx / denominator;
    terms[t + 4] = gy / denominator;
  }
}

/** Neighbour average ū at (x, y) of a planar field, edges repeated (Horn & Schunck's weights). */
function neighbourMean(field: Float32Array, width: number, height: number, x: number, y: number): number {
  const up = (y > 0 ? y - 1 : 0) * width;
  const row = y * width;
  const down = (y < height - 1 ? y + 1 : y) * width;
  const l = x > 0 ? x - 1 : 0;
  const r = x < width - 1 ? x + 1 : x;
  return (
    EDGE_WEIGHT * (field[up + x] + field[down + x] + field[row + l] + field[row + r]) +
    CORNER_WEIGHT * (field[up + l] + field[up + r] + field[down + l] + field[down + r])
  );
}

/** The Jacobi update of one pixel from its neighbour averages. */
function updatePixel(
  p: number,
  uMean: number,
  vMean: number,
  terms: Float32Array,
  uOut: Float32Array,
  vOut: Float32Array,
): void {
  const t = 5 * p;
  const residual = terms[t] * uMean + terms[t + 1] * vMean + terms[t + 2];
  uOut[p] = uMean - terms[t + 3] * residual;
  vOut[p] = vMean - terms[t + 4] * residual;
}

/** One Jacobi sweep from the planar field (u, v) into (uOut, vOut). */
function jacobiSweep(
  u: Float32Array,
  v: Float32Array,
  uOut: Float32Array,
  vOut: Float32Array,
  terms: Float32Array,
  width: number,
  height: number,
): void {
  for (let y = 0; y < height; y++) {
    const row = y * width;
    const edgeRow = y === 0 || y === height - 1;
    if (edgeRow || width < 3) {
      for (let x = 0; x < width; x++) {
        const uMean = neighbourMean(u, width, height, x, y);
        updatePixel(row + x, uMean, neighbourMean(v, width, height, x, y), terms, uOut, vOut);
      }
      continue;
    }
    const up = row - width;
    const down = row + width;
    updatePixel(row, neighbourMean(u, width, height, 0, y), neighbourMean(v, width, height, 0, y), terms, uOut, vOut);
    // Inside the frame every neighbour exists, so the indices need no clamping. Sums of the pixels above and
    // below each column, and the row's own values, slide along x so each value is read once per sweep.
    let uColumnLeft = u[up] + u[down];
    let uColumn = u[up + 1] + u[down + 1];
    let uLeft = u[row];
    let uHere = u[row + 1];
    let vColumnLeft = v[up] + v[down];
    let vColumn = v[up + 1] + v[down + 1];
    let vLeft = v[row];
    let vHere = v[row + 1];
    for (let x = 1; x < width - 1; x++) {
      const uColumnRight = u[up + x + 1] + u[down + x + 1];
      const uRight = u[row + x + 1];
      const vColumnRight = v[up + x + 1] + v[down + x + 1];
      const vRight = v[row + x + 1];
      const uMean = EDGE_WEIGHT * (uColumn + uLeft + uRight) + CORNER_WEIGHT * (uColumnLeft + uColumnRight);
      const vMean = EDGE_WEIGHT * (vColumn + vLeft + vRight) + CORNER_WEIGHT * (vColumnLeft + vColumnRight);
      updatePixel(row + x, uMean, vMean, terms, uOut, vOut);
      uColumnLeft = uColumn;
      uColumn = uColumnRight;
      uLeft = uHere;
      uHere = uRight;
      vColumnLeft = vColumn;
      vColumn = vColumnRight;
      vLeft = vHere;
      vHere = vRight;
    }
    const last = width - 1;
    const uLast = neighbourMean(u, width, height, last, y);
    updatePixel(row + last, uLast, neighbourMean(v, width, height, last, y), terms, uOut, vOut);
  }
}

/**
 * Motion from `prev` to `next` (grey levels 0..255, width × height, row order) as interleaved (u, v):
 * prev(x) ≈ next(x + (u, v)). Scratch buffers come from `workspace`; the result goes to `out` when given.
 */
export function estimateHornSchunck(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  params: HornSchunckParams = HORN_SCHUNCK_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  out?: Float32Array,
): Float32Array {
  assertFramePair(prev, next, width, height);
  validateHornSchunckParams(params);
  const result = outputField(width, height, out);
  coarseToFine(prev, next, width, height, params.levels, params.pyrScale, workspace, result, (frames, flow) => {
    const pixels = frames.width * frames.height;
    const terms = workspace.float32('hs.terms', 5 * pixels);
    // Planar u and v, twice, for the ping-pong of Jacobi iterations.
    const u = workspace.float32('hs.u', pixels);
    const v = workspace.float32('hs.v', pixels);
    const uSpare = workspace.float32('hs.uSpare', pixels);
    const vSpare = workspace.float32('hs.vSpare', pixels);
    for (let w = 0; w < params.warps; w++) {
      linearise(frames, flow, params.alpha, terms, workspace);
      for (let p = 0; p < pixels; p++) {
        u[p] = flow[2 * p];
        v[p] = flow[2 * p + 1];
      }
      for (let i = 0; i < params.iterations; i++) {
        // Even sweeps go (u, v) → spare, odd ones back, so the newest field alternates between the two.
        if (i % 2 === 0) jacobiSweep(u, v, uSpare, vSpare, terms, frames.width, frames.height);
        else jacobiSweep(uSpare, vSpare, u, v, terms, frames.width, frames.height);
      }
      const uFinal = params.iterations % 2 === 0 ? u : uSpare;
      const vFinal = params.iterations % 2 === 0 ? v : vSpare;
      for (let p = 0; p < pixels; p++) {
        flow[2 * p] = uFinal[p];
        flow[2 * p + 1] = vFinal[p];
      }
    }
  });
  return result;
}
