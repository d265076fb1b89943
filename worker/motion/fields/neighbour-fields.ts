// Forward and backward motion fields of neighbouring frames (t → t+1 and t+1 → t) along a run of consecutive
// frames, with any registered estimator. Farnebäck's polynomial expansion of a frame does not depend on the other
// frame, so each frame is expanded once and the expansion serves both fields of its pair and the next pair; the
// fields are bit-identical to estimating each ordered pair on its own (tests/unit/motion/determinism.test.ts).
// Every buffer comes from the workspace, so a thread that runs pair after pair allocates its large arrays once.

import {
  estimateFromExpansions,
  expandFrame,
  type FarnebackExpansion,
  type FarnebackParams,
} from '../farneback/farneback.js';
import { estimateMotion, resolveParams, type EstimatorParams } from '../index.js';
import { type EstimatorName } from '../../../shared/estimators';
import type { MotionWorkspace } from '../kernels/workspace.js';

export interface NeighbourFields {
  /** From the previous frame to the one just added, interleaved (u, v). */
  forward: Float32Array;
  /** From the frame just added back to the previous one. */
  backward: Float32Array;
}

/** Two alternating slots: the previous frame's data stays while the current frame's is written. */
const SLOTS = 2;

/**
 * Feeds frames of one run in order with `add`; from the second frame on, `add` answers the two fields between the
 * previous frame and this one. The answered arrays are workspace buffers that the next `add` overwrites.
 */
export class NeighbourFieldRun {
  private readonly pixels: number;
  private readonly expansions: (FarnebackExpansion | null)[] = [null, null];
  private readonly farneback: FarnebackParams | null;
  private added = 0;

  constructor(
    private readonly estimator: EstimatorName,
    /** The estimator's complete parameters (see resolveParams). */
    private readonly params: EstimatorParams[EstimatorName],
    private readonly width: number,
    private readonly height: number,
    private readonly workspace: MotionWorkspace,
  ) {
    this.pixels = width * height;
    this.farneback = estimator === 'farneback' ? resolveParams('farneback', params as Partial<FarnebackParams>) : null;
  }

  add(frame: Float32Array): NeighbourFields | null {
    const slot = this.added % SLOTS;
    const previous = (this.added + 1) % SLOTS;
    this.added += 1;
    const fields =
      this.added > 1
        ? {
            forward: this.workspace.float32('run.forward', 2 * this.pixels),
            backward: this.workspace.float32('run.backward', 2 * this.pixels),
          }
        : null;
    if (this.farneback) {
      this.addExpanded(frame, slot, previous, this.farneback, fields);
    } else {
      this.workspace.float32(`run.frame.${slot}`, this.pixels).set(frame);
      if (fields) this.estimateBoth(this.workspace.float32(`run.frame.${previous}`, this.pixels), frame, fields);
    }
    return fields;
  }

  private addExpanded(
    frame: Float32Array,
    slot: number,
    previous: number,
    params: FarnebackParams,
    fields: NeighbourFields | null,
  ): void {
    const { workspace } = this;
    const store = (level: number, length: number) => workspace.float32(`run.expansion.${slot}.${level}`, length);
    const expansion = expandFrame(frame, this.width, this.height, params, workspace, store);
    this.expansions[slot] = expansion;
    const before = this.expansions[previous];
    if (!fields || !before) return;
    estimateFromExpansions(before, expansion, params, workspace, fields.forward);
    estimateFromExpansions(expansion, before, params, workspace, fields.backward);
  }

  private estimateBoth(prev: Float32Array, next: Float32Array, fields: NeighbourFields): void {
    const { estimator, params, width, height, workspace } = this;
    estimateMotion(estimator, prev, next, width, height, params, workspace, fields.forward);
    estimateMotion(estimator, next, prev, width, height, params, workspace, fields.backward);
  }
}
