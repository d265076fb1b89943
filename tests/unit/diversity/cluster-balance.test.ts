import { describe, expect, it } from 'vitest';
import { balancePlan, mixClusters, shareCapMoments } from '../../../shared/diversity/cluster-balance';
import type { PlannedPair } from '../../../shared/pairing/pair-plan';
import type { ViewPair } from '../../../shared/pairing/pairing-graph';

const PAIRS: ViewPair[] = [
  { kind: 'frame~motion', a: 'frame', b: 'motion' } as ViewPair,
  { kind: 'luma~chroma', a: 'luma', b: 'chroma' } as ViewPair,
];

/** Clips 1..clips with `moments` moments each, two pairs per moment; clip c's moments fall in cluster c % k. */
function plan(clips: number, moments: number, valFrom = Infinity): PlannedPair[] {
  const out: PlannedPair[] = [];
  for (let clipId = 1; clipId <= clips; clipId += 1) {
    for (let moment = 0; moment < moments; moment += 1) {
      for (const pair of PAIRS) out.push({ clipId, moment, pair, split: clipId >= valFrom ? 'val' : 'train' });
    }
  }
  return out;
}

/** A skewed campaign: cluster 0 takes most moments (one rig, one light), clusters 1..3 a few; some unclustered. */
const skewed = (clipId: number, moment: number) =>
  clipId === 9 && moment < 3 ? null : clipId <= 6 ? 0 : (clipId % 3) + 1;

function momentCounts(planned: readonly PlannedPair[], clusterOf: typeof skewed) {
  const moments = new Map<string, number | null>();
  for (const item of planned) moments.set(`${item.clipId}:${item.moment}`, clusterOf(item.clipId, item.moment));
  const counts = new Map<number | null, number>();
  for (const cluster of moments.values()) counts.set(cluster, (counts.get(cluster) ?? 0) + 1);
  return { counts, total: moments.size };
}

describe('cluster balance', () => {
  const planned = plan(12, 20);

  it('holds a count cap exactly and keeps every pair of a kept moment', () => {
    const balanced = balancePlan(planned, skewed, { capMoments: 25 }, 7);
    const { counts, total } = momentCounts(balanced.planned, skewed);
    for (const count of counts.values()) expect(count).toBeLessThanOrEqual(25);
    expect(counts.get(0)).toBe(25);
    expect(balanced.momentsAfter).toBe(total);
    expect(balanced.planned.length).toBe(total * PAIRS.length);
    expect(balanced.rows.map((row) => row.cluster)).toEqual([0, 1, 2, 3, null]);
    expect(balanced.rows.find((row) => row.cluster === 0)).toMatchObject({ before: 120, after: 25 });
  });

  it('holds a share cap exactly, with the largest per-cluster count that allows', () => {
    for (const share of [0.2, 0.25, 0.3, 0.5, 0.9]) {
      const balanced = balancePlan(planned, skewed, { capShare: share }, 3);
      const { counts, total } = momentCounts(balanced.planned, skewed);
      for (const count of counts.values()) expect(count / total).toBeLessThanOrEqual(share);
      // One more moment per cluster would break the cap.
      const before = balanced.rows.map((row) => row.before);
      const m = balanced.capMoments!;
      const next = before.reduce((sum, count) => sum + Math.min(count, m + 1), 0);
      expect(m + 1 > share * next || Math.max(...before) <= m).toBe(true);
    }
  });

  // Worked example: counts 10, 3, 1 and share 0.5. m = 4: 4 ≤ 0.5·(4+3+1) = 4 holds; m = 5: 5 > 0.5·9.
  it('resolves a share cap by hand', () => {
    expect(shareCapMoments([10, 3, 1], 0.5)).toBe(4);
    // Two groups cannot each stay under a third.
    expect(shareCapMoments([10, 10], 0.3)).toBe(0);
    expect(shareCapMoments([5, 5, 5], 1)).toBe(5);
  });

  it('chooses the same moments for the same seed whatever the input order, others for another seed', () => {
    const shuffled = [...planned].reverse();
    const keys = (items: readonly PlannedPair[]) => new Set(items.map((item) => `${item.clipId}:${item.moment}`));
    const a = keys(balancePlan(planned, skewed, { capMoments: 10 }, 11).planned);
    const b = keys(balancePlan(shuffled, skewed, { capMoments: 10 }, 11).planned);
    const c = keys(balancePlan(planned, skewed, { capMoments: 10 }, 12).planned);
    expect([...a].sort()).toEqual([...b].sort());
    expect([...a].sort()).not.toEqual([...c].sort());
  });

  it('leaves the plan whole without a cap', () => {
    const balanced = balancePlan(planned, skewed, {}, 1);
    expect(balanced.planned).toEqual(planned);
    expect(balanced.capMoments).toBeNull();
  });
});

describe('cluster-mixed order', () => {
  it('takes clusters in turn within each split and keeps each moment’s pairs together', () => {
    const planned = plan(8, 3, 7);
    const clusterOf = (clipId: number) => (clipId <= 4 ? 0 : clipId <= 6 ? 1 : 2);
    const mixed = mixClusters(planned, clusterOf);
    expect(mixed).toHaveLength(planned.length);
    expect(new Set(mixed)).toEqual(new Set(planned));
    const train = mixed.filter((item) => item.split === 'train');
    expect(mixed.slice(0, train.length)).toEqual(train);
    const moments = train.filter((_, i) => i % PAIRS.length === 0);
    // Clusters 0 and 1 alternate while both have moments left (cluster 1 has 6, cluster 0 has 12).
    expect(moments.slice(0, 12).map((item) => clusterOf(item.clipId))).toEqual(new Array(6).fill([0, 1]).flat());
    train.forEach((item, i) => {
      if (i % PAIRS.length === 1) expect(item.moment).toBe(train[i - 1]!.moment);
    });
  });
});
