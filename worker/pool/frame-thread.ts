/**
 * Entry of each thread of the frame pool: one default export that runs a task by its kind. Threads load this file
 * through tsx's require hook (the `--import tsx` in the pool's execArgv); piscina looks for the default export
 * first, and only a file that has one loads that way.
 * libvips would start its own threads per image; one is enough when every core already runs a pool thread.
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
