import { describe, expect, it } from 'vitest';
import { silhouetteScore } from '../../../worker/diversity/silhouette';
import { sklearnSilhouette } from '../../helpers/sklearn-reference';
import { gaussianBlobs } from './blobs';

// Reference: scikit-learn's silhouette_score (Debian python3-sklearn), Euclidean metric, on generated data with
// known clusters.
describe('silhouette', () => {
  it('matches scikit-learn on blobs with their true labels', () => {
    const { points, truth } = gaussianBlobs({ clusters: 4, perCluster: 60, dims: 6, sd: 1, spread: 10, seed: 9 });
    const ours = silhouetteScore(points, 6, truth);
    expect(ours).toBeCloseTo(sklearnSilhouette(points, 6, truth), 12);
    expect(ours).toBeGreaterThan(0.3);
  });

  it('matches scikit-learn with a singleton cluster (scored 0) and wrong labels', () => {
    const { points } = gaussianBlobs({ clusters: 3, perCluster: 40, dims: 2, sd: 1, spread: 6, seed: 2 });
    const labels = Int32Array.from({ length: 120 }, (_, i) => (i === 7 ? 3 : i % 2));
    expect(silhouetteScore(points, 2, labels)).toBeCloseTo(sklearnSilhouette(points, 2, labels), 12);
  });

  // Worked example: points 0, 1 in one cluster, 10 in another. s(0) = (10 − 1)/10, s(1) = (9 − 1)/9, s(10) = 0.
  it('gives the hand-computed value of a three-point example', () => {
    const score = silhouetteScore(Float64Array.from([0, 1, 10]), 1, Int32Array.from([0, 0, 1]));
    expect(score).toBeCloseTo((0.9 + 8 / 9 + 0) / 3, 14);
  });
});
