/**
 * The frame pool's task runner (loaded by frame-thread-entry.mjs in each thread): one handler that runs a task by
 * its kind. libvips would start its own threads per image; one is enough when every core already runs a pool
 * thread.
 */
import sharp from 'sharp';
import { measureFrame, writeFrameViews, type FrameMeasurement, type FrameTask } from './frame-tasks';

sharp.concurrency(1);

export default function runFrameTask(task: FrameTask): Promise<FrameMeasurement | void> {
  switch (task.kind) {
    case 'measure':
      return measureFrame(task);
    case 'views':
      return writeFrameViews(task);
  }
}
