import { describe, expect, it } from 'vitest';
import { hammingDistance, hashToHex, hexToHash } from '../../../shared/review/hash-bits';
import { bestNearDuplicate, dHash, nearDuplicateShare } from '../../../worker/signals/perceptual-hash';
import { texturedGrey, withNoise } from './synthetic-frames';

const WIDTH = 90;
const HEIGHT = 64;

function scene(seed: number): Float32Array {
  return texturedGrey(WIDTH, HEIGHT, seed, { mean: 120, amplitude: 80 });
}

describe('dHash', () => {
  it('sets a bit when the left pixel is brighter, row by row, first bit most significant', () => {
    // N. Krawetz, "Kind of Like That", 2013 [V2, steps as quoted in copies]: 9×8 grey, one bit per neighbour pair,
    // "set based on whether the left pixel is brighter than the right pixel". A 9×8 image is hashed as is.
    // Only row 0 falls from left to right, so only the top 8 bits are set [C].
    const grey = Float32Array.from({ length: 72 }, (_, i) => {
      const [x, y] = [i % 9, Math.floor(i / 9)];
      return y === 0 ? 100 - x : x;
    });
    expect(hashToHex(dHash(grey, 9, 8))).toBe('ff00000000000000');
  });

  it('gives distance 0 for identical frames', () => {
    expect(hammingDistance(dHash(scene(1), WIDTH, HEIGHT), dHash(scene(1), WIDTH, HEIGHT))).toBe(0);
  });

  it('gives a small distance for the same frame with noise and a large one for another scene', () => {
    // Common practice for 64-bit perceptual hashes: 0–5 very similar, above 10 usually different [M].
    const base = dHash(scene(1), WIDTH, HEIGHT);
    const noisy = dHash(withNoise(scene(1), 6, 42), WIDTH, HEIGHT);
    const other = dHash(scene(2), WIDTH, HEIGHT);
    expect(hammingDistance(base, noisy)).toBeLessThanOrEqual(5);
    expect(hammingDistance(base, other)).toBeGreaterThan(16);
  });

  it('counts differing bits across both 32-bit halves', () => {
    expect(hammingDistance(0n, 0xffffffffffffffffn)).toBe(64);
    expect(hammingDistance(0x8000000000000001n, 0n)).toBe(2);
    expect(hammingDistance(0x0f0f0000_000000f0n, 0x0f0e0000_000000f1n)).toBe(2);
  });

  it('writes 16 hex digits and reads them back', () => {
    expect(hashToHex(0x1an)).toBe('000000000000001a');
    expect(hexToHash('ffffffffffffffff')).toBe(0xffffffffffffffffn);
    expect(() => hexToHash('xyz')).toThrow(RangeError);
  });
});

describe('near-duplicate clips', () => {
  const clip = [1, 2, 3, 4].map((seed) => scene(seed));
  const hashes = clip.map((f) => dHash(f, WIDTH, HEIGHT));
  const reencoded = clip.map((f, i) => dHash(withNoise(f, 5, 300 + i), WIDTH, HEIGHT));
  const unrelated = [11, 12, 13].map((seed) => dHash(scene(seed), WIDTH, HEIGHT));
  const half = [hashes[0], hashes[1], ...unrelated];

  it('measures the share of frames with a near match in the other clip', () => {
    expect(nearDuplicateShare(reencoded, hashes, 5)).toBe(1);
    expect(nearDuplicateShare(hashes, unrelated, 5)).toBe(0);
    expect(nearDuplicateShare(hashes, half, 5)).toBe(0.5);
    expect(nearDuplicateShare([], hashes, 5)).toBe(0);
  });

  it('picks the other clip with the largest share', () => {
    const best = bestNearDuplicate(
      reencoded,
      [
        { clipId: 'unrelated', hashes: unrelated },
        { clipId: 'source', hashes },
        { clipId: 'half', hashes: half },
      ],
      5,
    );
    expect(best).toEqual({ clipId: 'source', share: 1 });
    expect(bestNearDuplicate(hashes, [], 5)).toBeNull();
  });
});
