/**
 * The frame pool's task runner (loaded by frame-thread-entry.mjs in each thread): one handler that runs a task by
 * its kind. libvips would start its own threads per image; one is enough when every core already runs a pool
 * thread.
 */
import sharp from 'sharp';
import type { PairEvidence } from '../signals/cut-evidence';
import { runCriticTask, type CriticOutcome, type CriticTask } from './critic-tasks';
import { runKMeansTask, type KMeansRunOutcome, type KMeansRunTask } from '../diversity/cluster-moments';
import { measureFrame, type FrameMeasurement, type FrameTask } from './frame-tasks';
import { measureCutPairs, type CutPairsTask } from './cut-tasks';
import { estimateMotionRun, type MotionTask, type PairMotion } from './motion-tasks';

sharp.concurrency(1);

export default function runFrameTask(
  task: FrameTask | MotionTask | CutPairsTask | CriticTask | KMeansRunTask,
): Promise<FrameMeasurement | PairMotion[] | PairEvidence[] | CriticOutcome | KMeansRunOutcome | void> {
  switch (task.kind) {
    case 'measure':
      return measureFrame(task);
    case 'motion-run':
      return estimateMotionRun(task);
    case 'cut-pairs':
      return Promise.resolve(measureCutPairs(task));
    case 'critic':
      return Promise.resolve(runCriticTask(task));
    case 'kmeans-run':
      return Promise.resolve(runKMeansTask(task));
  }
}
