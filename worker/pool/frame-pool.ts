import os from 'node:os';
import PQueue from 'p-queue';
import { Piscina } from 'piscina';
// Loaded here, in the thread that owns the pool, so libvips stays loaded while threads come and go: when the last
// thread holding it ends, glibc would otherwise unload it under libvips' own threads (sharp's documented advice for
// worker threads).
import 'sharp';
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
  // Piscina reports a thread's stray message as an 'error' event, which without a listener would end the process.
  pool.on('error', (error: Error) => console.warn(`Kinefold worker: frame pool: ${error.message.split('\n')[0]}`));
  // Tasks wait here, at most one per thread in flight, rather than in piscina's own queue. Piscina cancels a running
  // task by terminating its thread, which may be inside libvips or halfway through writing a field file; here an
  // aborted task that has not started is dropped, and one that has started runs to its end and its answer is
  // dropped, so a caller that waits for its tasks to settle knows that no thread still works for it.
  const waiting = new PQueue({ concurrency: maxThreads });
  const closing = new AbortController();
  const run = <T>(task: object, signal?: AbortSignal): Promise<T> =>
    waiting.add(() => {
      closing.signal.throwIfAborted();
      signal?.throwIfAborted();
      return pool.run(task) as Promise<T>;
    });
  return {
    measureFrame: (task, signal) => run({ kind: 'measure', ...task }, signal),
    estimateMotionRun: (task, signal) => run({ kind: 'motion-run', ...task }, signal),
    measureCutPairs: (task, signal) => run({ kind: 'cut-pairs', ...task }, signal),
    trainCritic: (task, signal) => run({ kind: 'critic', ...task }, signal),
    runKMeans: (task, signal) => run({ kind: 'kmeans-run', ...task }, signal),
    threads: maxThreads,
    async destroy() {
      // Threads end only once idle: the tasks not started fail at once, the running ones finish.
      closing.abort(new Error('The frame pool was closed.'));
      await waiting.onIdle();
      await pool.destroy();
    },
  };
}
