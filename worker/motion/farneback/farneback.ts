// Farnebäck dense motion estimation: polynomial expansion of both frames, then coarse-to-fine iterations that
// solve windowed 2×2 systems for the displacement.
// Source: G. Farnebäck, "Two-Frame Motion Estimation Based on Polynomial Expansion", SCIA 2003. The structure,
// parameters and defaults follow OpenCV's calcOpticalFlowFarneback (video/src/optflowgf.cpp) so that fields can
// be compared with it pixel by pixel.

import { POLY_CHANNELS, polyExpand, polyExpansionConstants, polyRowBufferLength } from './poly-exp.js';
import { gaussianWindow, solveFlowBox, solveFlowGaussian, updateMatrices } from './update.js';
import { assertFramePair, outputField } from '../kernels/estimator-input.js';
import { buildLevel, pyramidLevels, type PyramidLevel } from '../kernels/pyramid.js';
import { resampleBufferLength, resizeFlow } from '../kernels/resample.js';
import { MotionWorkspace } from '../kernels/workspace.js';
import { estimatorParamsProblem } from '../../../shared/schemas/project-settings';

export interface FarnebackParams {
  /** Size ratio between pyramid levels, in (0, 1). */
  pyrScale: number;
  /** Pyramid levels above the frame (fewer when a side would drop under 32 px). */
  levels: number;
  /** Averaging window side in pixels; larger is more robust to noise and blurrier. */
  winSize: number;
  /** Iterations per pyramid level. */
  iterations: number;
  /** Polynomial expansion radius: the fit uses (2·polyN + 1)² pixels. */
  polyN: number;
  /** Gaussian σ of the expansion's applicability; OpenCV's documentation suggests 1.1 for polyN 5, 1.5 for 7. */
  polySigma: number;
  /** Gaussian instead of box window (OpenCV's OPTFLOW_FARNEBACK_GAUSSIAN): slower, somewhat more accurate. */
  gaussianWindow: boolean;
}

/** OpenCV's usual call, calcOpticalFlowFarneback(prev, next, flow, 0.5, 3, 15, 3, 5, 1.2, 0). */
export const FARNEBACK_DEFAULTS: Readonly<FarnebackParams> = Object.freeze({
  pyrScale: 0.5,
  levels: 3,
  winSize: 15,
  iterations: 3,
  polyN: 5,
  polySigma: 1.2,
  gaussianWindow: false,
});

/** Checks the parameters against their ranges (shared/schemas/project-settings.ts, also used when a project is saved). */
export function validateFarnebackParams(params: FarnebackParams): void {
  const problem = estimatorParamsProblem('farneback', params);
  if (problem) throw new Error(problem);
}

/** Where an expansion keeps its coefficients for pyramid level `level` (`length` floats). */
export type CoefficientStore = (level: number, length: number) => Float32Array;

/**
 * One frame's polynomial expansion at every pyramid level. It does not depend on the other frame, so a frame's
 * expansion can serve the forward and the backward field and the next pair.
 */
export interface FarnebackExpansion {
  width: number;
  height: number;
  /** The parameters that shape the expansion; estimation checks that both frames agree with its own. */
  shape: Pick<FarnebackParams, 'pyrScale' | 'levels' | 'polyN' | 'polySigma'>;
  levels: PyramidLevel[];
  /** Per level, 5 coefficients per pixel (see farneback-poly-exp.ts). */
  coefficients: Float32Array[];
}

const newCoefficients: CoefficientStore = (_level, length) => new Float32Array(length);

/**
 * Expands `frame` (grey levels 0..255) at every pyramid level the parameters give. By default the coefficients
 * are new arrays owned by the caller; pass a `store` to reuse buffers.
 */
export function expandFrame(
  frame: Float32Array,
  width: number,
  height: number,
  params: FarnebackParams = FARNEBACK_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  store: CoefficientStore = newCoefficients,
): FarnebackExpansion {
  assertFramePair(frame, frame, width, height);
  validateFarnebackParams(params);
  const levels = pyramidLevels(width, height, params.levels, params.pyrScale);
  const constants = polyExpansionConstants(params.polyN, params.polySigma);
  const coefficients = levels.map((level, k) => {
    const pixels = level.width * level.height;
    const image = workspace.float32('fb.image', pixels);
    const rowBuffer = workspace.float64('fb.polyRow', polyRowBufferLength(level.width, params.polyN));
    const coefficientsAtLevel = store(k, pixels * POLY_CHANNELS);
    buildLevel(frame, width, height, level, image, workspace);
    polyExpand(image, level.width, level.height, constants, coefficientsAtLevel, rowBuffer);
    return coefficientsAtLevel;
  });
  const { pyrScale, levels: levelCount, polyN, polySigma } = params;
  return { width, height, shape: { pyrScale, levels: levelCount, polyN, polySigma }, levels, coefficients };
}

function assertSameShape(expansion: FarnebackExpansion, reference: FarnebackExpansion, params: FarnebackParams): void {
  const { shape } = expansion;
  const matches =
    expansion.width === reference.width &&
    expansion.height === reference.height &&
    shape.pyrScale === params.pyrScale &&
    shape.levels === params.levels &&
    shape.polyN === params.polyN &&
    shape.polySigma === params.polySigma;
  if (!matches) throw new Error('farneback: the expansions do not match each other or the parameters');
}

/**
 * Motion between two expanded frames (see expandFrame), as interleaved (u, v): prev(x) ≈ next(x + (u, v)).
 * This is the iterative part of Farnebäck's method; with the expansions it gives the same field as
 * estimateFarneback on the frames.
 */
export function estimateFromExpansions(
  prev: FarnebackExpansion,
  next: FarnebackExpansion,
  params: FarnebackParams = FARNEBACK_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  out?: Float32Array,
): Float32Array {
  validateFarnebackParams(params);
  assertSameShape(prev, prev, params);
  assertSameShape(next, prev, params);
  const result = outputField(prev.width, prev.height, out);
  const window = params.gaussianWindow ? gaussianWindow(params.winSize) : undefined;
  const half = params.winSize >> 1;
  const levels = prev.levels;

  let coarser: { flow: Float32Array; width: number; height: number } | undefined;
  for (let k = levels.length - 1; k >= 0; k--) {
    const { width: w, height: h } = levels[k];
    const pixels = w * h;
    // Adjacent levels alternate between two buffers so the coarser field survives until it is resized.
    const flow = k === 0 ? result : workspace.float32(k % 2 === 1 ? 'fb.flowOdd' : 'fb.flowEven', 2 * pixels);
    if (coarser === undefined) {
      flow.fill(0);
    } else {
      // OpenCV scales by 1/pyrScale even where rounding makes the size ratio differ slightly.
      const factor = 1 / params.pyrScale;
      const lines = workspace.float32('fb.resizeLines', resampleBufferLength(w));
      resizeFlow(coarser.flow, coarser.width, coarser.height, flow, w, h, factor, factor, lines);
    }
    const r0 = prev.coefficients[k];
    const r1 = next.coefficients[k];
    const matrices = workspace.float32('fb.matrices', pixels * POLY_CHANNELS);
    updateMatrices(r0, r1, flow, matrices, w, h);
    // Between iterations the box solve refreshes the matrices as it goes; the Gaussian one is followed by a pass.
    const refresh = (first: number, last: number) => updateMatrices(r0, r1, flow, matrices, w, h, first, last);
    for (let i = 0; i < params.iterations; i++) {
      const more = i < params.iterations - 1;
      if (window === undefined) {
        const columnSums = workspace.float64('fb.boxColumns', (w + 2 * half + 2) * POLY_CHANNELS);
        solveFlowBox(matrices, flow, w, h, params.winSize, columnSums, more ? refresh : undefined);
      } else {
        const columnSums = workspace.float32('fb.gaussColumns', (w + 2 * half) * POLY_CHANNELS);
        const rowSums = workspace.float32('fb.gaussRows', w * POLY_CHANNELS);
        solveFlowGaussian(matrices, flow, w, h, window, columnSums, rowSums);
        if (more) updateMatrices(r0, r1, flow, matrices, w, h);
      }
    }
    coarser = { flow, width: w, height: h };
  }
  return result;
}

/**
 * Motion from `prev` to `next` (grey levels 0..255, width × height, row order) as interleaved (u, v):
 * prev(x) ≈ next(x + (u, v)). Scratch buffers come from `workspace`; the result goes to `out` when given.
 */
export function estimateFarneback(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  params: FarnebackParams = FARNEBACK_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  out?: Float32Array,
): Float32Array {
  assertFramePair(prev, next, width, height);
  const first = expandFrame(prev, width, height, params, workspace, (k, n) => workspace.float32(`fb.prev.${k}`, n));
  const second = expandFrame(next, width, height, params, workspace, (k, n) => workspace.float32(`fb.next.${k}`, n));
  return estimateFromExpansions(first, second, params, workspace, out);
}
