/**
 * A fixed, training-free embedding of a view plane (view-plane.ts), for the pair-difficulty report:
 * 1. shrink the plane to a thumbSize × thumbSize thumbnail by area averaging (16 × 16 by default);
 * 2. remove the thumbnail's mean, so only the spatial layout counts, not the brightness or the scale;
 * 3. project with a seeded random Gaussian matrix to `dims` dimensions (128 by default);
 * 4. normalise to unit length (L2), which also removes contrast.
 * A random Gaussian projection keeps inner products on average (Johnson–Lindenstrauss lemma [M]), so the
 * cosine of two embeddings estimates the Pearson correlation of the two thumbnails: views whose coarse layouts
 * agree score high. The same options give the same embedding everywhere; a flat plane embeds to the zero vector.
 */

import { resizeArea } from './area-resize';
import { mulberry32, standardNormal } from './seeded-random';

export interface FixedEmbeddingOptions {
  thumbSize: number;
  dims: number;
  seed: number;
}

export type FixedEmbedder = (plane: Float32Array, width: number, height: number) => Float32Array;

export const DEFAULT_FIXED_EMBEDDING: Readonly<FixedEmbeddingOptions> = Object.freeze({
  thumbSize: 16,
  dims: 128,
  seed: 1,
});

/** Draws the projection once; the returned function embeds planes of any size. */
export function createFixedEmbedder(options: FixedEmbeddingOptions = DEFAULT_FIXED_EMBEDDING): FixedEmbedder {
  const { thumbSize, dims, seed } = options;
  if (!Number.isInteger(thumbSize) || thumbSize < 1 || !Number.isInteger(dims) || dims < 1) {
    throw new RangeError(`thumbSize and dims must be positive integers, got ${thumbSize} and ${dims}`);
  }
  const inputs = thumbSize * thumbSize;
  const random = mulberry32(seed);
  const projection = Float64Array.from({ length: dims * inputs }, () => standardNormal(random));
  return (plane, width, height) => {
    const thumb = resizeArea(plane, width, height, thumbSize, thumbSize);
    let mean = 0;
    for (const v of thumb) mean += v;
    mean /= inputs;
    const out = new Float32Array(dims);
    let norm = 0;
    for (let d = 0; d < dims; d += 1) {
      let acc = 0;
      const row = d * inputs;
      for (let i = 0; i < inputs; i += 1) acc += projection[row + i] * (thumb[i] - mean);
      out[d] = acc;
      norm += acc * acc;
    }
    if (norm > 0) {
      const scale = 1 / Math.sqrt(norm);
      for (let d = 0; d < dims; d += 1) out[d] *= scale;
    }
    return out;
  };
}
