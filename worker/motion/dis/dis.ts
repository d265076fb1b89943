// DIS (Dense Inverse Search) dense motion estimation: on each level of an area pyramid, coarse to fine, patches
// on a regular grid find their displacement by inverse-compositional Lucas–Kanade starting from the coarser
// level's field (dis-inverse-search.ts), the patch vectors are averaged into a dense field weighted by how well
// they fit each pixel (dis-densify.ts), and a variational refinement smooths it (dis-variational.ts). The field
// of the finest level searched is upsampled to the frame.
// Source: T. Kroeger, R. Timofte, D. Dai, L. Van Gool, "Fast Optical Flow using Dense Inverse Search", ECCV 2016.
// Parameters, presets, the number of levels and the extras over the paper (patch mean normalisation, spatial
// propagation) follow OpenCV's DISOpticalFlow (video/src/dis_flow.cpp).

import { densify, densifyBufferLength } from './densify.js';
import { inverseSearch, type PatchVectors, type SearchFrames } from './inverse-search.js';
import { halveArea, levelSide, padReplicate, patchSource, upsampleBufferLength, upsampleFlow } from './levels.js';
import { PATCH_TERMS, patchGrid, patchTerms } from './patch-grid.js';
import { refineField } from './variational.js';
import { assertFramePair, outputField } from '../kernels/estimator-input.js';
import { MotionWorkspace } from '../kernels/workspace.js';
import { estimatorParamsProblem } from '../../../shared/schemas/project-settings';

export interface DisParams {
  /** Finest pyramid level searched (0 = full resolution, each level halves the one below). */
  finestScale: number;
  /** Side of the square patches in pixels. */
  patchSize: number;
  /** Distance between neighbouring patches in pixels; below the patch size, patches overlap. */
  patchStride: number;
  /** Gauss–Newton iterations per patch and level, shared by a forward and a backward sweep of the grid. */
  descentIterations: number;
  /** Fixed-point iterations of the variational refinement per level; 0 turns it off. */
  refinementIterations: number;
  /** Refinement: weight of smoothness. */
  alpha: number;
  /** Refinement: weight of brightness constancy. */
  delta: number;
  /** Refinement: weight of gradient constancy. */
  gamma: number;
  /** Compare patches after removing their mean brightness (robust to lighting changes). */
  meanNormalisation: boolean;
}

export type DisPreset = 'fast' | 'medium';

// OpenCV's DISOpticalFlow::create: patch size 8 for every preset; PRESET_FAST = finest scale 2, stride 4,
// 16 descent iterations, 5 refinement iterations; PRESET_MEDIUM = finest scale 1, stride 3, 25 and 5.
// α = 20, δ = 5, γ = 10 and mean normalisation on are its defaults (DISOpticalFlowImpl's constructor).
const COMMON = { patchSize: 8, refinementIterations: 5, alpha: 20, delta: 5, gamma: 10, meanNormalisation: true };

export const DIS_PRESETS: Readonly<Record<DisPreset, Readonly<DisParams>>> = Object.freeze({
  fast: Object.freeze({ ...COMMON, finestScale: 2, patchStride: 4, descentIterations: 16 }),
  medium: Object.freeze({ ...COMMON, finestScale: 1, patchStride: 3, descentIterations: 25 }),
});

/** The medium preset. The refinement's inner SOR sweeps (3) are fixed in dis-variational.ts. */
export const DIS_DEFAULTS: Readonly<DisParams> = DIS_PRESETS.medium;

const MAX_SCALE = 10;

/** Checks the parameters against their ranges (shared/schemas/project-settings.ts, also used when a project is saved). */
export function validateDisParams(params: DisParams): void {
  const problem = estimatorParamsProblem('dis', params);
  if (problem) throw new Error(problem);
}

/**
 * The coarsest and finest levels used for a frame, as OpenCV chooses them: the coarsest where a patch spans
 * about a quarter of the frame's longer side, no coarser than leaves a patch inside the shorter side.
 */
export function disScales(width: number, height: number, params: DisParams): { coarsest: number; finest: number } {
  const byMotion = Math.trunc(Math.log2(Math.max(width, height) / (4 * params.patchSize)) + 0.5);
  const byPatch = Math.trunc(Math.log2(Math.min(width, height) / params.patchSize));
  const coarsest = Math.max(0, Math.min(byMotion, byPatch, MAX_SCALE));
  return { coarsest, finest: Math.min(params.finestScale, coarsest) };
}

interface Level {
  width: number;
  height: number;
  prev: Float32Array;
  next: Float32Array;
}

/** Levels 0..coarsest of both frames; level 0 is the frames themselves. */
function buildPyramid(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  coarsest: number,
  workspace: MotionWorkspace,
): Level[] {
  const levels: Level[] = [{ width, height, prev, next }];
  for (let k = 1; k <= coarsest; k++) {
    const below = levels[k - 1];
    const w = levelSide(width, k);
    const h = levelSide(height, k);
    const level = {
      width: w,
      height: h,
      prev: workspace.float32(`dis.prev.${k}`, w * h),
      next: workspace.float32(`dis.next.${k}`, w * h),
    };
    halveArea(below.prev, below.width, below.height, level.prev);
    halveArea(below.next, below.width, below.height, level.next);
    levels.push(level);
  }
  return levels;
}

/** Patch search and densification on one level: (u, v) in, the densified field out. */
function searchLevel(level: Level, u: Float32Array, v: Float32Array, params: DisParams, ws: MotionWorkspace): void {
  const { width: w, height: h } = level;
  const grid = patchGrid(w, h, params.patchSize, params.patchStride);
  if (grid.cols === 0) return;
  const pixels = w * h;
  // Enough for a patch clamped to the frame edge and for densify's stretched edge patches.
  const border = params.patchSize + params.patchStride;
  const frames: SearchFrames = {
    width: w,
    height: h,
    source: ws.float32('dis.source', 3 * pixels),
    paddedNext: ws.float32('dis.paddedNext', (w + 2 * border) * (h + 2 * border)),
    border,
  };
  patchSource(level.prev, w, h, frames.source);
  padReplicate(level.next, w, h, border, frames.paddedNext);
  const patches = grid.cols * grid.rows;
  const terms = ws.float32('dis.patchTerms', PATCH_TERMS * patches);
  const rowSums = ws.float32('dis.patchRowSums', 5 * h * grid.cols);
  patchTerms(frames.source, w, h, grid, params.meanNormalisation, rowSums, terms);
  const vectors: PatchVectors = {
    u: ws.float32('dis.patchU', patches),
    v: ws.float32('dis.patchV', patches),
    distance: ws.float32('dis.patchDistance', patches),
    settled: ws.float32('dis.patchSettled', patches),
  };
  const line = ws.float64('dis.line', params.patchSize + params.patchStride);
  const scratch = { line, step: ws.float64('dis.step', 2) };
  inverseSearch(frames, grid, terms, u, v, params.descentIterations, params.meanNormalisation, scratch, vectors);
  densify(frames, grid, vectors.u, vectors.v, ws.float32('dis.densify', densifyBufferLength(w, h)), line, u, v);
}

/**
 * Motion from `prev` to `next` (grey levels 0..255, width × height, row order) as interleaved (u, v):
 * prev(x) ≈ next(x + (u, v)). Scratch buffers come from `workspace`; the result goes to `out` when given.
 */
export function estimateDis(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  params: DisParams = DIS_DEFAULTS,
  workspace: MotionWorkspace = new MotionWorkspace(),
  out?: Float32Array,
): Float32Array {
  assertFramePair(prev, next, width, height);
  validateDisParams(params);
  const result = outputField(width, height, out);
  const { coarsest, finest } = disScales(width, height, params);
  const levels = buildPyramid(prev, next, width, height, coarsest, workspace);
  const refinement = {
    alpha: params.alpha,
    delta: params.delta,
    gamma: params.gamma,
    iterations: params.refinementIterations,
  };
  let coarser: { u: Float32Array; v: Float32Array; width: number; height: number } | undefined;
  for (let k = coarsest; k >= finest; k--) {
    const level = levels[k];
    const pixels = level.width * level.height;
    // Adjacent levels alternate between two pairs of planes so the coarser field survives until upsampled.
    const parity = k % 2 === 1 ? 'Odd' : 'Even';
    const u = workspace.float32(`dis.u${parity}`, pixels);
    const v = workspace.float32(`dis.v${parity}`, pixels);
    if (coarser === undefined) {
      u.fill(0);
      v.fill(0);
    } else {
      const lines = workspace.float32('dis.upsample', upsampleBufferLength(level.width));
      const { width: cw, height: ch } = coarser;
      upsampleFlow(coarser.u, coarser.v, cw, ch, 2, lines, u, v, level.width, level.height, 1);
    }
    searchLevel(level, u, v, params, workspace);
    refineField(level.prev, level.next, level.width, level.height, u, v, refinement, workspace);
    coarser = { u, v, width: level.width, height: level.height };
  }
  const last = coarser as NonNullable<typeof coarser>;
  const lines = workspace.float32('dis.upsample', upsampleBufferLength(width));
  const factor = 2 ** finest;
  upsampleFlow(last.u, last.v, last.width, last.height, factor, lines, result, result.subarray(1), width, height, 2);
  return result;
}
