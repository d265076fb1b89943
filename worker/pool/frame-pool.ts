import os from 'node:os';
import { Piscina } from 'piscina';
import type { CriticOutcome, CriticTask } from './critic-tasks';
import type { KMeansRunOutcome, KMeansRunTask } from '../diversity/cluster-moments';
import type { FrameMeasurement, MeasureFrameTask } from './frame-tasks';
import type { PairEvidence } from '../signals/cut-evidence';
import type { CutPairsTask } from './cut-tasks';
import type { MotionRunTask, PairMotion } from './motion-tasks';

/**
 * The worker-thread pool for CPU-heavy per-frame work, one thread per core, so a clip's frames are measured on
 * both cores while the job loop stays free. Every thread, in tests and in production alike, starts from
 * frame-thread-entry.mjs, which registers tsx's loader in the thread and imports the TypeScript entry; execArgv is
 * empty so nothing of the parent's command line (vitest's or `--import tsx`) reaches the threads.
 */
export interface FramePool {
  measureFrame(task: Omit<MeasureFrameTask, 'kind'>, signal?: AbortSignal): Promise<FrameMeasurement>;
  /** Fields of a run of neighbouring frames; the thread keeps its motion buffers from one run to the next. */
  estimateMotionRun(task: Omit<MotionRunTask, 'kind'>, signal?: AbortSignal): Promise<PairMotion[]>;
  /** The cut detector's motion and edge evidence of consecutive thumbs, pair by pair. */
  measureCutPairs(task: Omit<CutPairsTask, 'kind'>, signal?: AbortSignal): Promise<PairEvidence[]>;
  /** Trains one view pair's critic for the pair-difficulty report and measures its bounds. */
  trainCritic(task: Omit<CriticTask, 'kind'>, signal?: AbortSignal): Promise<CriticOutcome>;
  /** One k-means restart (or one candidate k with its silhouette) of a clustering of moments. */
  runKMeans(task: Omit<KMeansRunTask, 'kind'>, signal?: AbortSignal): Promise<KMeansRunOutcome>;
  /** Threads at most, so a stage can split its work into enough pieces to keep each one busy. */
  threads: number;
  destroy(): Promise<void>;
}

const IDLE_THREAD_MS = 30_000;

export function createFramePool(threads = os.availableParallelism()): FramePool {
  const maxThreads = Math.max(1, threads);
  const pool = new Piscina({
    filename: new URL('./frame-thread-entry.mjs', import.meta.url).href,
    execArgv: [],
    minThreads: 1,
    maxThreads,
    // Piscina ends a thread above minThreads as soon as it idles; a short pause between stages or clips would then
    // cost a thread start and the thread's motion buffers.
    idleTimeout: IDLE_THREAD_MS,
  });
  // A task aborted (its clip was removed) while its answer was already on the way back comes home to no one; piscina
  // reports that as an 'error' event, which without a listener would end the whole worker process.
  pool.on('error', (error: Error) => console.warn(`Kinefold worker: frame pool: ${error.message.split('\n')[0]}`));
  return {
    measureFrame: (task, signal) => pool.run({ kind: 'measure', ...task }, { signal }),
    estimateMotionRun: (task, signal) => pool.run({ kind: 'motion-run', ...task }, { signal }),
    measureCutPairs: (task, signal) => pool.run({ kind: 'cut-pairs', ...task }, { signal }),
    trainCritic: (task, signal) => pool.run({ kind: 'critic', ...task }, { signal }),
    runKMeans: (task, signal) => pool.run({ kind: 'kmeans-run', ...task }, { signal }),
    threads: maxThreads,
    destroy: () => pool.destroy(),
  };
}
