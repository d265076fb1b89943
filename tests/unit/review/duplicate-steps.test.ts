import { describe, expect, it } from 'vitest';
import { alignDuplicate, hexHashDistance } from '../../../shared/review/duplicate-steps';
import { hammingDistance, hashToHex } from '../../../shared/review/hash-bits';

/** A repeatable spread of 64-bit hashes (a linear congruential walk; any spread would do). */
function hashes(count: number, seed: number): string[] {
  let state = BigInt(seed);
  return Array.from({ length: count }, () => {
    state = (state * 6364136223846793005n + 1442695040888963407n) & 0xffffffffffffffffn;
    return hashToHex(state);
  });
}

describe('hash distance on stored hex hashes', () => {
  it('counts differing bits: worked examples', () => {
    expect(hexHashDistance('0000000000000000', '0000000000000000')).toBe(0);
    expect(hexHashDistance('0000000000000000', 'ffffffffffffffff')).toBe(64);
    // 0x0f and 0x01 differ in 3 bits; 0x8 and 0x0 (top nibble of the high half) in 1 [C].
    expect(hexHashDistance('800000000000000f', '0000000000000001')).toBe(4);
  });

  it("agrees with the duplicate flag's own count on 200 pairs", () => {
    const a = hashes(200, 7);
    const b = hashes(200, 11);
    for (let i = 0; i < a.length; i += 1) {
      expect(hexHashDistance(a[i]!, b[i]!)).toBe(hammingDistance(BigInt(`0x${a[i]}`), BigInt(`0x${b[i]}`)));
    }
  });
});

describe('two clips in step', () => {
  it('finds the shift of a copy that starts three frames later, with distance 0 in step', () => {
    const original = hashes(20, 3);
    const copy = [...hashes(3, 99), ...original.slice(0, 17)];
    const { shift, steps, meanDistance } = alignDuplicate(original, copy);
    expect(shift).toBe(3);
    expect(meanDistance).toBe(0);
    expect(steps[0]).toEqual({ index: 0, otherIndex: 3, distance: 0 });
    expect(steps[17]).toEqual({ index: 17, otherIndex: null, distance: null });
  });

  it('keeps shift 0 for unrelated clips of equal length unless another shift matches better', () => {
    const same = hashes(10, 5);
    expect(alignDuplicate(same, same).shift).toBe(0);
  });

  it('leaves unmeasured frames without a distance and does not let a tiny overlap win', () => {
    const a = hashes(8, 21);
    // The last frame of b equals the first of a: shift 7 pairs them with distance 0 but overlaps one frame only,
    // under half of 8, so it is never chosen.
    const b = [...hashes(7, 22), a[0]!];
    const aligned = alignDuplicate(a, b);
    expect(aligned.shift).not.toBe(7);
    expect(aligned.meanDistance).toBeGreaterThan(0);
    const withGap = alignDuplicate([a[0]!, null, a[2]!], [a[0]!, a[1]!, a[2]!]);
    expect(withGap.steps.map((step) => step.distance)).toEqual([0, null, 0]);
  });
});
