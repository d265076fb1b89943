import type { ClipState } from '../clip-states';
import type { MotionScale } from '../motion/motion-scale';
import type { ClipStage } from '../pipeline-stages';

/**
 * The forward motion field from this frame to the next (px per frame step at the working size); null until the
 * Motion stage has run, and where a cut or the clip's end follows the frame.
 */
export interface FrameMotion {
  meanMagnitude: number;
  p95Magnitude: number;
  consistentShare: number;
}

/** One sampled frame and its signals, as `GET /api/clips/:id/frames` lists them. */
export interface ClipFrame {
  index: number;
  timeS: number;
  /** Signals are null while the signals stage has not measured the frame yet. */
  meanLuma: number | null;
  contrast: number | null;
  sharpness: number | null;
  clippedShare: number | null;
  cutBefore: boolean;
  motion: FrameMotion | null;
}

export interface ClipFrameList {
  items: ClipFrame[];
  total: number;
  /** Motion at full colour in this clip's pictures and what it was taken from (motion-scale.ts); null: no fields. */
  motionScale: MotionScale | null;
}

/** Where processing of a clip stands: its state, the stage running (or that failed) and that stage's progress. */
export interface ClipProgress {
  state: ClipState;
  stage: ClipStage | null;
  /** Share of the current stage done, 0..1 (1 once processing finished). */
  progress: number;
}
