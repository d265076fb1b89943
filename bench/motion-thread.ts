/**
 * One motion-benchmark task in a pool thread: the forward field of one pair with one estimator. Frames arrive as
 * shared memory (no copy per task) and the thread keeps one MotionWorkspace, as the product's pool threads do.
 */
import { estimateMotion, type EstimatorParams } from '../worker/motion/index';
import { type EstimatorName } from '../shared/estimators';
import { MotionWorkspace } from '../worker/motion/kernels/workspace';

export interface BenchPairTask {
  estimator: EstimatorName;
  params: EstimatorParams[EstimatorName];
  width: number;
  height: number;
  prev: SharedArrayBuffer;
  next: SharedArrayBuffer;
}

const workspace = new MotionWorkspace();
let out = new Float32Array(0);

/** Runs the estimator and answers the field's first u, so the work cannot be skipped. */
export default function estimatePair(task: BenchPairTask): number {
  const { width, height } = task;
  if (out.length !== 2 * width * height) out = new Float32Array(2 * width * height);
  const prev = new Float32Array(task.prev);
  const next = new Float32Array(task.next);
  return estimateMotion(task.estimator, prev, next, width, height, task.params, workspace, out).flow[0]!;
}
