import os from 'node:os';
import { Piscina } from 'piscina';
import type { FrameMeasurement, FrameViewsTask, MeasureFrameTask } from './frame-tasks';

/**
 * The worker-thread pool for CPU-heavy per-frame work, one thread per core, so a clip's frames are measured on
 * both cores while the job loop stays free. Threads load the TypeScript entry through tsx's loader, exactly as the
 * worker process itself runs (`node --import tsx worker/index.ts`), in tests and in production alike.
 */
export interface FramePool {
  measureFrame(task: Omit<MeasureFrameTask, 'kind'>, signal?: AbortSignal): Promise<FrameMeasurement>;
  writeFrameViews(task: Omit<FrameViewsTask, 'kind'>, signal?: AbortSignal): Promise<void>;
  destroy(): Promise<void>;
}

export function createFramePool(threads = os.availableParallelism()): FramePool {
  const pool = new Piscina({
    filename: new URL('./frame-thread.ts', import.meta.url).href,
    execArgv: ['--import', 'tsx'],
    minThreads: 1,
    maxThreads: Math.max(1, threads),
  });
  return {
    measureFrame: (task, signal) => pool.run({ kind: 'measure', ...task }, { signal }),
    writeFrameViews: (task, signal) => pool.run({ kind: 'views', ...task }, { signal }),
    destroy: () => pool.destroy(),
  };
}
