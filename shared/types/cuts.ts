/**
 * Why a frame has (or has not) a cut before it: the evidence the detector measured between the frame and the one
 * before it, what fired, and any curator's mark that overrides the detector.
 */

/** The measures of cut evidence; each fires on its own rule (worker/signals/cut-decision.ts). */
export type CutEvidenceName = 'histogram' | 'edges' | 'warp' | 'consistency';

export const CUT_EVIDENCE_NAMES: readonly CutEvidenceName[] = Object.freeze([
  'histogram',
  'edges',
  'warp',
  'consistency',
]);

/**
 * `hard`: a cut between the two frames; `gradual`: the frame lies in a fade or dissolve (a cut before each of its
 * frames, so no pair reaches across it); `flash`: one bright frame, no cut.
 */
export type CutKind = 'hard' | 'gradual' | 'flash';

export interface CutEvidence {
  /** 1 − correlation of the grey histograms (0 the same, up to 2). */
  histogramDistance: number;
  /** Edge change ratio, 0..1. */
  edgeChange: number;
  /** Forward–backward consistent share of the coarse motion field, 0..1; null: the camera's shift alone explained
   * the pair, so no field was needed. */
  motionConsistency: number | null;
  /** Error left after warping by the coarse motion, over the frames' mean deviation (0 explained, about 1 not). */
  warpError: number;
  /** The warp error of the clip around this pair (median of the neighbouring pairs): the local level. */
  localWarpError: number;
  /** The threshold each fired measure crossed here, by name. */
  fired: Partial<Record<CutEvidenceName, number>>;
  /** What the detector decided; null: no cut. */
  kind: CutKind | null;
}

/** A curator's correction: `cut` adds a cut before the frame, `none` removes the detector's. */
export type CutMarkValue = 'cut' | 'none';

export interface CutMark {
  value: CutMarkValue;
  byUserId: number;
  byName: string | null;
  at: string;
}

/** One frame's cut as the clip page explains it. */
export interface FrameCut {
  index: number;
  timeS: number;
  /** The detector's decision (before any mark). */
  detected: boolean;
  /** What counts: the mark when there is one, else the detector. */
  cutBefore: boolean;
  evidence: CutEvidence | null;
  mark: CutMark | null;
}

export interface ClipCutList {
  /** Frames with a detected or marked cut, or evidence that fired, in index order. */
  items: FrameCut[];
}
