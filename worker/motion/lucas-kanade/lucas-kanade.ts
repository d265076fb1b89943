// Dense pyramidal Lucas–Kanade: at every pixel, the displacement that best explains the brightness change over a
// Gaussian-weighted window (least squares with the 2×2 structure tensor), refined iteratively per pyramid level.
// Sources: B. D. Lucas, T. Kanade, "An Iterative Image Registration Technique with an Application to Stereo
// Vision", IJCAI 1981; J.-Y. Bouguet, "Pyramidal Implementation of the Lucas Kanade Feature Tracker", Intel,
// 2000 (gradients of the first frame, a fixed tensor G per level, iterations ν ← ν + G⁻¹b with
// b = Σ w·(I − J(x + ν))·∇I). Dense: the window sums for all pixels at once are Gaussian blurs of the products.

import { coarseToFine, type LevelFrames } from '../kernels/coarse-to-fine.js';
import { centralDifferences } from '../kernels/derivatives.js';
import { assertFramePair, outputField } from '../kernels/estimator-input.js';
import { gaussianBlur, gaussianKernel } from '../kernels/gaussian-blur.js';
import { warpBackward } from '../kernels/resample.js';
import { MotionWorkspace } from '../kernels/workspace.js';
import { estimatorParamsProblem } from '../../../shared/schemas/project-settings';

export interface LucasKanadeParams {
  /** Pyramid levels above the frame (fewer when a side would drop under 32 px). */
  levels: number;
  /** Size ratio between pyramid levels, in (0, 1). */
  pyrScale: number;
  /** σ of the Gaussian window in pixels; the kernel spans ±3σ. */
  windowSigma: number;
  /** Refinement iterations per level. */
  iterations: number;
  /**
   * Added to the tensor's diagonal (grey levels² per pixel²) so that flat or one-dimensional windows keep
   * the coarser estimate instead of amplifying noise.
   */
  regularisation: number;
}

/** Defaults chosen on Kinefold's generated pairs and Grove3 (see tests/unit/motion for the figures). */
export const LUCAS_KANADE_DEFAULTS: Readonly<LucasKanadeParams> = Object.freeze({
  levels: 3,
  pyrScale: 0.5,
  windowSigma: 2.5,
  iterations: 3,
  regularisation: 1,
});

const KERNEL_SIGMAS = 3;

/** Checks the parameters against their ranges (shared/schemas/project-settings.ts, also used when a project is saved). */
export function validateLucasKanadeParams(params: LucasKanadeParams): void {
  const problem = estimatorParamsProblem('lucas-kanade', params);
  if (problem) throw new Error(problem);
}

/** Refines one level's field in place. */
function refineLevel(
  frames: LevelFrames,
  flow: Float32Array,
  params: LucasKanadeParams,
  kernel: Float32Array,
  ws: MotionWorkspace,
): void {
  const { width, height, prev, next } = frames;
  const pixels = width * height;
  const ix = ws.float32('lk.ix', pixels);
  const iy = ws.float32('lk.iy', pixels);
  const gxx = ws.float32('lk.gxx', pixels);
  const gxy = ws.float32('lk.gxy', pixels);
  const gyy = ws.float32('lk.gyy', pixels);
  centralDifferences(prev, width, height, ix, iy);
  for (let p = 0; p < pixels; p++) {
    gxx[p] = ix[p] * ix[p];
    gxy[p] = ix[p] * iy[p];
    gyy[p] = iy[p] * iy[p];
  }
  gaussianBlur(gxx, gxx, width, height, kernel, ws);
  gaussianBlur(gxy, gxy, width, height, kernel, ws);
  gaussianBlur(gyy, gyy, width, height, kernel, ws);
  // Keep (G + εI)⁻¹ in place of G: it is the same for every iteration of the level.
  const eps = params.regularisation;
  for (let p = 0; p < pixels; p++) {
    const a = gxx[p] + eps;
    const b = gxy[p];
    const d = gyy[p] + eps;
    const det = a * d - b * b;
    const inverseDet = det > 0 ? 1 / det : 0;
    gxx[p] = d * inverseDet;
    gxy[p] = -b * inverseDet;
    gyy[p] = a * inverseDet;
  }
  const warped = ws.float32('lk.warped', pixels);
  const bx = ws.float32('lk.bx', pixels);
  const by = ws.float32('lk.by', pixels);
  for (let i = 0; i < params.iterations; i++) {
    warpBackward(next, width, height, flow, warped);
    // Bouguet's b for the window at x needs I − J(x' + ν(x)) for every x' in the window. A blur only gives each
    // x' its own ν(x'), so the error is carried back to first order: I − J(x' + ν(x')) + ∇I·ν(x'). The window
    // sum of that term, minus G·ν(x), is b to first order; adding G·ν(x) gives the new estimate directly.
    // Without this the field's fine-grained noise grows with every iteration.
    for (let p = 0; p < pixels; p++) {
      const gx = ix[p];
      const gy = iy[p];
      const error = prev[p] - warped[p] + gx * flow[2 * p] + gy * flow[2 * p + 1];
      bx[p] = error * gx;
      by[p] = error * gy;
    }
    gaussianBlur(bx, bx, width, height, kernel, ws);
    gaussianBlur(by, by, width, height, kernel, ws);
    // ν ← (G + εI)⁻¹(G·ν + b + ε·ν): with ε, a window without texture keeps its previous estimate.
    for (let p = 0; p < pixels; p++) {
      const sx = bx[p] + eps * flow[2 * p];
      const sy = by[p] + eps * flow[2 * p + 1];
      flow[2 * p] = gxx[p] * sx + gxy[p] * sy;
      flow[2 * p + 1] = gxy[p] * sx + gyy[p] * sy;
    }
  }
}

/**
 * Motion from `prev` to `next` (grey levels 0..255, width × height, row order) as interleaved (u, v):
 * prev(x) ≈ next(x + (u, v)). Scratch buffers come from `workspace`; the result goes to `out` when given.
 */
export function estimateLucasKanade(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  params: LucasKanadeParams = LUCAS_KANADE_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  out?: Float32Array,
): Float32Array {
  assertFramePair(prev, next, width, height);
  validateLucasKanadeParams(params);
  const result = outputField(width, height, out);
  const taps = 2 * Math.ceil(KERNEL_SIGMAS * params.windowSigma) + 1;
  const kernel = gaussianKernel(taps, params.windowSigma);
  coarseToFine(prev, next, width, height, params.levels, params.pyrScale, workspace, result, (frames, flow) =>
    refineLevel(frames, flow, params, kernel, workspace),
  );
  return result;
}
