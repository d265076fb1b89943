import os from 'node:os';
import { Piscina } from 'piscina';
import type { FrameMeasurement, FrameViewsTask, MeasureFrameTask } from './frame-tasks';

/**
 * The worker-thread pool for CPU-heavy per-frame work, one thread per core, so a clip's frames are measured on
 * both cores while the job loop stays free. Every thread, in tests and in production alike, starts from
 * frame-thread-entry.mjs, which registers tsx's loader in the thread and imports the TypeScript entry; execArgv is
 * empty so nothing of the parent's command line (vitest's or `--import tsx`) reaches the threads.
 */
export interface FramePool {
  measureFrame(task: Omit<MeasureFrameTask, 'kind'>, signal?: AbortSignal): Promise<FrameMeasurement>;
  writeFrameViews(task: Omit<FrameViewsTask, 'kind'>, signal?: AbortSignal): Promise<void>;
  destroy(): Promise<void>;
}

export function createFramePool(threads = os.availableParallelism()): FramePool {
  const pool = new Piscina({
    filename: new URL('./frame-thread-entry.mjs', import.meta.url).href,
    execArgv: [],
    minThreads: 1,
    maxThreads: Math.max(1, threads),
  });
  return {
    measureFrame: (task, signal) => pool.run({ kind: 'measure', ...task }, { signal }),
    writeFrameViews: (task, signal) => pool.run({ kind: 'views', ...task }, { signal }),
    destroy: () => pool.destroy(),
  };
}
