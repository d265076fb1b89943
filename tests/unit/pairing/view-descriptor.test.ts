import { describe, expect, it } from 'vitest';
import { DESCRIPTOR_LENGTH, viewDescriptor } from '../../../shared/pairing/view-descriptor';

const plane = (width: number, height: number, value: (x: number, y: number) => number) =>
  Float32Array.from({ length: width * height }, (_, p) => value(p % width, Math.floor(p / width)));

describe('view descriptor', () => {
  it('has a standardised layout half and texture half (mean 0, variance 1 each)', () => {
    const d = viewDescriptor(
      plane(96, 64, (x, y) => Math.sin(x / 5) * 40 + y),
      96,
      64,
    );
    expect(d).toHaveLength(DESCRIPTOR_LENGTH);
    for (const half of [d.subarray(0, 64), d.subarray(64)]) {
      const mean = half.reduce((s, v) => s + v, 0) / half.length;
      const variance = half.reduce((s, v) => s + (v - mean) ** 2, 0) / half.length;
      expect(mean).toBeCloseTo(0, 5);
      expect(variance).toBeCloseTo(1, 4);
    }
  });

  it('ignores brightness and contrast: a·I + b gives the same descriptor', () => {
    const base = plane(80, 60, (x, y) => (x * 7 + y * 13) % 17);
    const changed = base.map((v) => 3 * v + 50);
    const a = viewDescriptor(base, 80, 60);
    const b = viewDescriptor(changed, 80, 60);
    a.forEach((value, i) => expect(b[i]).toBeCloseTo(value, 4));
  });

  it('puts texture energy where the texture is', () => {
    // Left half textured, right half flat: the texture map is high in the left columns, low in the right ones.
    const checks = (x: number, y: number) => ((Math.floor(x / 2) + Math.floor(y / 2)) % 2) * 100;
    const d = viewDescriptor(
      plane(64, 64, (x, y) => (x < 32 ? checks(x, y) : 50)),
      64,
      64,
    );
    const texture = d.subarray(64);
    expect(texture[8 * 3 + 1]!).toBeGreaterThan(texture[8 * 3 + 6]!);
  });

  it('gives zeros for a flat plane, and refuses a plane of the wrong size', () => {
    expect([...viewDescriptor(new Float32Array(40 * 30).fill(7), 40, 30)].every((v) => v === 0)).toBe(true);
    expect(() => viewDescriptor(new Float32Array(10), 4, 4)).toThrow(/needs 16 values/);
  });
});
