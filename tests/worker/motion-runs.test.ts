import { describe, expect, it } from 'vitest';
import { MAX_RUN_PAIRS, neighbourRuns, splitRuns, type PairRun } from '../../worker/pipeline/motion-runs';

const frames = (count: number, cuts: number[] = []) =>
  Array.from({ length: count }, (_, index) => ({ index, cutBefore: cuts.includes(index) }));

/** Every pair t → t+1 a list of runs covers. */
const pairsOf = (runs: PairRun[]) => runs.flatMap((run) => Array.from({ length: run.pairs }, (_, k) => run.first + k));

describe('neighbour runs', () => {
  it('makes one run of n − 1 pairs from n frames without cuts', () => {
    expect(neighbourRuns(frames(6))).toEqual([{ first: 0, pairs: 5 }]);
  });

  it('leaves out the pair across each cut (DESIGN §2: no pair may span a cut)', () => {
    // Cuts before frames 3 and 4: pairs 2 → 3 and 3 → 4 go; 4 → 5 stays [C].
    expect(neighbourRuns(frames(6, [3, 4]))).toEqual([
      { first: 0, pairs: 2 },
      { first: 4, pairs: 1 },
    ]);
    expect(pairsOf(neighbourRuns(frames(6, [3, 4])))).toEqual([0, 1, 4]);
  });

  it('has no pair for a single frame, a cut at every frame, or a gap in the indices', () => {
    expect(neighbourRuns(frames(1))).toEqual([]);
    expect(neighbourRuns(frames(4, [1, 2, 3]))).toEqual([]);
    expect(
      neighbourRuns([
        { index: 0, cutBefore: false },
        { index: 2, cutBefore: false },
      ]),
    ).toEqual([]);
  });
});

describe('splitting runs for the pool', () => {
  it('keeps every pair exactly once, in order, in pieces no longer than the limit', () => {
    const runs = neighbourRuns(frames(300, [40, 41, 170]));
    for (const threads of [1, 2, 4]) {
      const pieces = splitRuns(runs, threads);
      expect(pairsOf(pieces)).toEqual(pairsOf(runs));
      for (const piece of pieces) expect(piece.pairs).toBeGreaterThanOrEqual(1);
      for (const piece of pieces) expect(piece.pairs).toBeLessThanOrEqual(MAX_RUN_PAIRS);
    }
  });

  it('gives each of two threads several pieces of a short clip, of lengths differing by at most one', () => {
    // 19 pairs, 2 threads, 4 pieces each aimed at: pieces of at most ⌈19 / 8⌉ = 3 pairs, 7 of them [C].
    const pieces = splitRuns(neighbourRuns(frames(20)), 2);
    expect(pieces.map((piece) => piece.pairs).sort()).toEqual([2, 3, 3, 3, 3, 3, 2].sort());
    expect(pairsOf(pieces)).toEqual([...Array(19).keys()]);
  });
});
