import { describe, expect, it } from 'vitest';
import { countPlanned, planPairs, type PlanClip } from '../../../shared/pairing/pair-plan';
import { pairKinds, type MomentFrame } from '../../../shared/pairing/pairing-graph';
import { splitOfClip } from '../../../shared/pairing/split';
import { histogram } from '../../../server/core/pairsets/pairset-statistics';

function clip(id: number, count: number, cutsBefore: number[] = [], motionUntil = count - 1): PlanClip {
  const frames: MomentFrame[] = Array.from({ length: count }, (_, index) => ({
    index,
    cutBefore: cutsBefore.includes(index),
    motion: index < motionUntil ? { meanMagnitude: index, consistentShare: 1 } : null,
  }));
  return { id, frames };
}

describe('planning the pairs of a definition', () => {
  const split = { val: 0.5, seed: 4 };
  const clips = [clip(3, 6), clip(1, 5, [3]), clip(2, 4), clip(5, 7), clip(4, 3)];

  it('orders pairs train before val, clips by id, moments ascending, view pairs in graph order', () => {
    const pairs = pairKinds(['frame', 'neighbour+1', 'motion'], 'core');
    const planned = planPairs(clips, pairs, split);
    const order = planned.map((item) => [
      item.split === 'train' ? 0 : 1,
      item.clipId,
      item.moment,
      pairs.findIndex((pair) => pair.kind === item.pair.kind),
    ]);
    const sorted = [...order].sort((x, y) => x[0]! - y[0]! || x[1]! - y[1]! || x[2]! - y[2]! || x[3]! - y[3]!);
    expect(order).toEqual(sorted);
    for (const item of planned) expect(item.split).toBe(splitOfClip(item.clipId, split));
    expect(new Set(planned.map((item) => item.split))).toEqual(new Set(['train', 'val']));
  });

  it('never spans a cut, never passes the clip end, and needs the field for motion pairs', () => {
    const pairs = pairKinds(['frame', 'neighbour+1', 'motion'], 'core');
    const planned = planPairs([clip(1, 5, [3], 2)], pairs, split);
    // 5 frames, a cut before frame 3: t + 1 stays on the same side only for t = 0, 1, 3; fields exist for t < 2.
    expect(planned.filter((item) => item.pair.kind === 'frame~neighbour+1').map((item) => item.moment)).toEqual([
      0, 1, 3,
    ]);
    expect(planned.filter((item) => item.pair.kind === 'frame~motion').map((item) => item.moment)).toEqual([0, 1]);
  });

  it('counts per view pair and split, and the counts add up to the plan', () => {
    const pairs = pairKinds(['frame', 'luma', 'chroma'], 'full');
    const planned = planPairs(clips, pairs, split);
    const counts = countPlanned(planned, pairs);
    expect(counts.map((count) => count.pair.kind)).toEqual(['frame~luma', 'frame~chroma', 'luma~chroma']);
    // Views that reach no other frame give a pair at every frame: 6 + 5 + 4 + 7 + 3 = 25 per view pair.
    for (const count of counts) {
      expect(count.total).toBe(25);
      expect(count.train + count.val).toBe(25);
    }
    expect(counts.reduce((sum, count) => sum + count.total, 0)).toBe(planned.length);
  });

  it('applies the motion filters to every pair of the moment', () => {
    const pairs = pairKinds(['frame', 'luma'], 'core');
    const planned = planPairs([clip(1, 6)], pairs, split, { minMeanMotion: 2 });
    expect(planned.map((item) => item.moment)).toEqual([2, 3, 4]);
  });
});

describe('histograms of the statistics', () => {
  it('puts values in equal-width bins from the smallest to the largest, the largest in the last bin', () => {
    expect(histogram([0, 1, 2, 3, 4, 10], 2, 5)).toEqual({
      edges: [0, 2, 4, 6, 8, 10],
      counts: [2, 2, 1, 0, 1],
      missing: 2,
    });
  });

  it('keeps one bin for equal values and none for no values', () => {
    expect(histogram([3, 3, 3])).toEqual({ edges: [3, 3], counts: [3], missing: 0 });
    expect(histogram([], 4)).toEqual({ edges: [], counts: [], missing: 4 });
  });
});
