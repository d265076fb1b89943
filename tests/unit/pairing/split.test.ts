import { describe, expect, it } from 'vitest';
import { splitClips, splitOfClip, splitPosition } from '../../../shared/pairing/split';

const ids = Array.from({ length: 1000 }, (_, i) => `clip-${i}`);

describe('train/val split by clip', () => {
  it('puts every clip in exactly one split', () => {
    const { train, val } = splitClips(ids, { val: 0.1, seed: 1 });
    expect(train.length + val.length).toBe(ids.length);
    expect(new Set([...train, ...val]).size).toBe(ids.length);
    expect(train.filter((id) => val.includes(id))).toEqual([]);
  });

  it('meets the ratio within three binomial standard deviations', () => {
    // Each clip goes to val with probability r, so the val count is Binomial(n, r): σ = √(n r (1 − r)) [C].
    for (const [ratio, seed] of [
      [0.1, 1],
      [0.3, 7],
      [0.5, 99],
    ]) {
      const { val } = splitClips(ids, { val: ratio, seed });
      const sigma = Math.sqrt(ids.length * ratio * (1 - ratio));
      expect(Math.abs(val.length - ids.length * ratio)).toBeLessThan(3 * sigma);
    }
  });

  it('gives the same split for the same seed and another split for another seed', () => {
    expect(splitClips(ids, { val: 0.2, seed: 5 })).toEqual(splitClips(ids, { val: 0.2, seed: 5 }));
    expect(splitClips(ids, { val: 0.2, seed: 6 }).val).not.toEqual(splitClips(ids, { val: 0.2, seed: 5 }).val);
  });

  it('keeps every clip in its split when clips are added', () => {
    const before = splitClips(ids.slice(0, 500), { val: 0.2, seed: 3 });
    const after = splitClips(ids, { val: 0.2, seed: 3 });
    expect(after.val.filter((id) => ids.indexOf(id) < 500)).toEqual(before.val);
  });

  it('handles the ends of the ratio and numeric ids, and refuses ratios outside 0..1', () => {
    expect(splitClips(ids, { val: 0, seed: 1 }).val).toEqual([]);
    expect(splitClips(ids, { val: 1, seed: 1 }).train).toEqual([]);
    expect(splitOfClip(42, { val: 0.5, seed: 1 })).toBe(splitOfClip('42', { val: 0.5, seed: 1 }));
    expect(() => splitOfClip('a', { val: 1.5, seed: 1 })).toThrow(RangeError);
    const p = splitPosition('clip-1', 1);
    expect(p >= 0 && p < 1).toBe(true);
  });
});
