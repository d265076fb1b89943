// Coarse-to-fine driver shared by the gradient-based estimators (Horn–Schunck, Lucas–Kanade): estimate on the
// coarsest pyramid level, then upsample the field to the next finer level as its starting point, and so on.
// The standard scheme for motions larger than the derivative support (Bouguet, "Pyramidal Implementation of the
// Lucas Kanade Feature Tracker", Intel, 2000; Brox et al., "High Accuracy Optical Flow Estimation Based on a
// Theory for Warping", ECCV 2004). Levels and smoothing are those of pyramid.ts.

import { buildLevel, pyramidLevels } from './pyramid.js';
import { resampleBufferLength, resizeFlow } from './resample.js';
import type { MotionWorkspace } from './workspace.js';

export interface LevelFrames {
  width: number;
  height: number;
  prev: Float32Array;
  next: Float32Array;
}

/** Refines `flow` (the level's size, interleaved u, v) in place for one level. */
export type LevelRefiner = (frames: LevelFrames, flow: Float32Array) => void;

export function coarseToFine(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  levelCount: number,
  pyrScale: number,
  workspace: MotionWorkspace,
  out: Float32Array,
  refine: LevelRefiner,
): void {
  const levels = pyramidLevels(width, height, levelCount, pyrScale);
  let coarser: { flow: Float32Array; width: number; height: number } | undefined;
  for (let k = levels.length - 1; k >= 0; k--) {
    const { width: w, height: h } = levels[k];
    // Adjacent levels alternate between two buffers so the coarser field survives until it is resized.
    const flow = k === 0 ? out : workspace.float32(k % 2 === 1 ? 'c2f.flowOdd' : 'c2f.flowEven', 2 * w * h);
    if (coarser === undefined) {
      flow.fill(0);
    } else {
      // Scale by the actual size ratio per axis: rounding makes it differ slightly from 1/pyrScale.
      const { flow: from, width: cw, height: ch } = coarser;
      const lines = workspace.float32('c2f.resizeLines', resampleBufferLength(w));
      resizeFlow(from, cw, ch, flow, w, h, w / cw, h / ch, lines);
    }
    const frames: LevelFrames = {
      width: w,
      height: h,
      prev: workspace.float32('c2f.prev', w * h),
      next: workspace.float32('c2f.next', w * h),
    };
    buildLevel(prev, width, height, levels[k], frames.prev, workspace);
    buildLevel(next, width, height, levels[k], frames.next, workspace);
    refine(frames, flow);
    coarser = { flow, width: w, height: h };
  }
}
