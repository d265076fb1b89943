/**
 * The Motion stage's work in the worker-thread pool: the forward and backward fields of a run of neighbouring
 * frames with their consistency and summaries; the forward field is stored packed with its consistency plane
 * (server/core/media/packed-field.ts), the backward one serves only the check and is not kept. Each thread keeps one
 * MotionWorkspace for its whole life, so pair after pair reuses the estimators' large buffers instead of
 * allocating them anew (which costs much on these machines). The computations are the pure functions of
 * worker/motion/ and shared/motion/.
 */
import fs from 'node:fs';
import { rgbToGrey } from '../../shared/colour/grey';
import { encodePackedField } from '../../server/core/media/packed-field';
import { readRgbImage } from '../../server/core/media/frame-images';
import { CONSISTENCY_DEFAULTS, forwardBackwardConsistency } from '../motion/fields/consistency';
import { summariseField, type FieldSummary } from '../motion/fields/field-summary';
import type { EstimatorName } from '../../shared/estimators';
import type { EstimatorParams } from '../motion/index';
import { NeighbourFieldRun, type NeighbourFields } from '../motion/fields/neighbour-fields';
import { MotionWorkspace } from '../motion/kernels/workspace';
import { motionDescriptor } from '../signals/moment-descriptor';

/** Frames k → k+1 of `frameFiles` (consecutive frames with no cut between them), both ways. */
export interface MotionRunTask {
  kind: 'motion-run';
  frameFiles: string[];
  estimator: EstimatorName;
  /** The estimator's complete parameters (resolveParams), recorded with every field. */
  params: EstimatorParams[EstimatorName];
  /** Where the forward field of pair k goes (packed field), one per pair. */
  forwardFiles: string[];
}

/** Summaries of pair k's two fields; each one's consistency is checked against the other field. */
export interface PairMotion {
  forward: FieldSummary;
  backward: FieldSummary;
  /** The motion part of moment k's descriptor, from the forward field (moment-descriptor.ts). */
  descriptor: Float32Array;
}

export type MotionTask = MotionRunTask;

/** This thread's buffers, kept between tasks (see the module comment). */
const workspace = new MotionWorkspace();
let maskBuffer = new Uint8Array(0);

export async function estimateMotionRun(task: MotionRunTask): Promise<PairMotion[]> {
  const { frameFiles, forwardFiles } = task;
  const pairs = frameFiles.length - 1;
  if (pairs < 1 || forwardFiles.length !== pairs) {
    throw new Error(`motion run: ${frameFiles.length} frames need ${Math.max(0, pairs)} field files`);
  }
  let run: NeighbourFieldRun | null = null;
  let size = { width: 0, height: 0 };
  const results: PairMotion[] = [];
  for (const [k, file] of frameFiles.entries()) {
    const { rgb, width, height } = await readRgbImage(file);
    if (run === null) {
      run = new NeighbourFieldRun(task.estimator, task.params, width, height, workspace);
      size = { width, height };
    } else if (width !== size.width || height !== size.height) {
      throw new Error(`motion run: ${file} is ${width}x${height}, the run's frames are ${size.width}x${size.height}`);
    }
    const fields = run.add(rgbToGrey(rgb, workspace.float32('task.grey', width * height)));
    if (fields) results.push(await storePair(fields, width, height, forwardFiles[k - 1]!));
  }
  return results;
}

async function storePair(
  fields: NeighbourFields,
  width: number,
  height: number,
  forwardFile: string,
): Promise<PairMotion> {
  const pixels = width * height;
  if (maskBuffer.length !== pixels) maskBuffer = new Uint8Array(pixels);
  const scratch = workspace.float32('task.magnitudes', pixels);
  const summary = (field: Float32Array, other: Float32Array): FieldSummary => {
    forwardBackwardConsistency(field, other, width, height, CONSISTENCY_DEFAULTS, maskBuffer);
    return summariseField(field, maskBuffer, scratch);
  };
  const forward = summary(fields.forward, fields.backward);
  // Packed before the first await and before the backward check reuses the mask: the next frame of the run
  // overwrites the field buffers.
  const packed = encodePackedField({ width, height, flow: fields.forward, consistent: maskBuffer });
  const backward = summary(fields.backward, fields.forward);
  const descriptor = motionDescriptor(fields.forward);
  await fs.promises.writeFile(forwardFile, packed);
  return { forward, backward, descriptor };
}
