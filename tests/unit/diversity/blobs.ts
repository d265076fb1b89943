import { mulberry32, standardNormal } from '../../../shared/pairing/seeded-random';

/**
 * Gaussian blobs (like scikit-learn's make_blobs): `clusters` centres drawn uniformly in [−spread, spread]^d, then
 * `perCluster` points around each with standard deviation `sd`, interleaved so no cluster sits in one block.
 */
export function gaussianBlobs(options: {
  clusters: number;
  perCluster: number;
  dims: number;
  sd: number;
  spread: number;
  seed: number;
}) {
  const { clusters, perCluster, dims, sd, spread, seed } = options;
  const random = mulberry32(seed);
  const centres = Array.from({ length: clusters }, () =>
    Array.from({ length: dims }, () => (random() * 2 - 1) * spread),
  );
  const points = new Float64Array(clusters * perCluster * dims);
  const truth = new Int32Array(clusters * perCluster);
  for (let p = 0; p < perCluster; p += 1) {
    for (let c = 0; c < clusters; c += 1) {
      const i = p * clusters + c;
      truth[i] = c;
      for (let j = 0; j < dims; j += 1) points[i * dims + j] = centres[c]![j]! + sd * standardNormal(random);
    }
  }
  return { points, truth };
}
