/**
 * Which neighbour pairs get motion fields, grouped for the thread pool. A pair t → t+1 exists when frame t+1
 * follows frame t with no cut before it (no field ever spans a cut). Consecutive pairs form runs; a run goes to
 * one thread as one task so each frame is read and prepared once for both pairs it belongs to. Runs are cut into
 * pieces short enough that every thread gets several, which keeps both cores busy to the end of a clip.
 */

export interface PairRun {
  /** Index of the run's first frame; its pairs are first → first+1, …, first+pairs−1 → first+pairs. */
  first: number;
  pairs: number;
}

/** Longest piece: sharing saves (pairs − 1) of 2·pairs frame preparations, little more beyond this. */
export const MAX_RUN_PAIRS = 8;
/** Pieces aimed at per thread, so a slow piece at the end does not leave a core idle for long. */
const PIECES_PER_THREAD = 4;

export interface FrameCut {
  index: number;
  cutBefore: boolean;
}

/** The maximal runs of pairs in frames listed in index order. */
export function neighbourRuns(frames: readonly FrameCut[]): PairRun[] {
  const runs: PairRun[] = [];
  let current: PairRun | null = null;
  for (let i = 1; i < frames.length; i += 1) {
    const linked = frames[i]!.index === frames[i - 1]!.index + 1 && !frames[i]!.cutBefore;
    if (!linked) {
      current = null;
    } else if (current) {
      current.pairs += 1;
    } else {
      current = { first: frames[i - 1]!.index, pairs: 1 };
      runs.push(current);
    }
  }
  return runs;
}

/** Cuts runs into pieces of nearly equal length, at most MAX_RUN_PAIRS, about PIECES_PER_THREAD per thread. */
export function splitRuns(runs: readonly PairRun[], threads: number): PairRun[] {
  const total = runs.reduce((sum, run) => sum + run.pairs, 0);
  const longest = Math.min(MAX_RUN_PAIRS, Math.max(1, Math.ceil(total / (Math.max(1, threads) * PIECES_PER_THREAD))));
  return runs.flatMap((run) => {
    const pieces = Math.ceil(run.pairs / longest);
    return Array.from({ length: pieces }, (_, k) => {
      const start = Math.round((k * run.pairs) / pieces);
      const end = Math.round(((k + 1) * run.pairs) / pieces);
      return { first: run.first + start, pairs: end - start };
    });
  });
}
