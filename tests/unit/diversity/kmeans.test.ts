import { describe, expect, it } from 'vitest';
import { mulberry32 } from '../../../shared/pairing/seeded-random';
import { kMeans, kMeansPlusPlus, kMeansRestart, lloyd, restartSeed } from '../../../worker/diversity/kmeans';
import { sklearnKMeans } from '../../helpers/sklearn-reference';
import { gaussianBlobs } from './blobs';

// Reference: scikit-learn's KMeans (Debian python3-sklearn) given the same initial centres, n_init=1 and the
// Lloyd algorithm must give the same labels and, within 1e-9 relative, the same inertia and centres.
describe('k-means against scikit-learn', () => {
  const cases = [
    // Well separated: settles in a few iterations.
    { name: 'separated blobs', clusters: 4, perCluster: 150, dims: 5, sd: 1, spread: 10, k: 4, seed: 11 },
    // Overlapping blobs and k above the true count: many iterations, labels change late.
    {
      name: 'overlapping blobs, k too large',
      clusters: 3,
      perCluster: 200,
      dims: 3,
      sd: 2.5,
      spread: 4,
      k: 6,
      seed: 5,
    },
    // The descriptor's size, as the clustering job meets it.
    { name: 'descriptor-sized', clusters: 8, perCluster: 100, dims: 24, sd: 1.5, spread: 3, k: 8, seed: 23 },
  ];
  for (const { name, k, ...blob } of cases) {
    it(`gives the reference labels and inertia: ${name}`, () => {
      const { points } = gaussianBlobs(blob);
      const initial = kMeansPlusPlus(points, blob.dims, k, mulberry32(blob.seed));
      const ours = lloyd(points, blob.dims, initial);
      const reference = sklearnKMeans(points, blob.dims, initial);
      expect([...ours.labels]).toEqual(reference.labels);
      expect(Math.abs(ours.inertia - reference.inertia) / reference.inertia).toBeLessThan(1e-9);
      ours.centres.forEach((value, j) => expect(value).toBeCloseTo(reference.centres[j]!, 9));
      expect(ours.iterations).toBe(reference.iterations);
    });
  }
});

describe('k-means with seeded restarts', () => {
  const blob = { clusters: 5, perCluster: 80, dims: 4, sd: 1.2, spread: 5, seed: 3 };
  const { points, truth } = gaussianBlobs(blob);

  it('gives the same result for the same seed', () => {
    const first = kMeans(points, blob.dims, { k: 5, restarts: 4, seed: 42 });
    const second = kMeans(points, blob.dims, { k: 5, restarts: 4, seed: 42 });
    expect([...second.labels]).toEqual([...first.labels]);
    expect(second.inertia).toBe(first.inertia);
  });

  it('keeps the restart of least inertia', () => {
    const singles = Array.from({ length: 4 }, (_, run) => kMeansRestart(points, blob.dims, 5, restartSeed(42, run)));
    const best = kMeans(points, blob.dims, { k: 5, restarts: 4, seed: 42 });
    expect(best.inertia).toBe(Math.min(...singles.map((single) => single.inertia)));
    expect(new Set(singles.map((single) => single.inertia)).size).toBeGreaterThan(1);
  });

  it('recovers well separated clusters (each found cluster is one true cluster)', () => {
    const separated = gaussianBlobs({ ...blob, sd: 0.3, spread: 20 });
    const { labels } = kMeans(separated.points, blob.dims, { k: 5, restarts: 3, seed: 1 });
    const truthOf = new Map<number, Set<number>>();
    labels.forEach((label, i) => truthOf.set(label, (truthOf.get(label) ?? new Set()).add(separated.truth[i]!)));
    expect(truthOf.size).toBe(5);
    for (const members of truthOf.values()) expect(members.size).toBe(1);
    expect(truth.length).toBe(400);
  });

  it('refuses a k beyond the number of points', () => {
    expect(() => kMeans(points.subarray(0, 8), blob.dims, { k: 3, restarts: 1, seed: 1 })).toThrow(/k must be/);
  });
});
