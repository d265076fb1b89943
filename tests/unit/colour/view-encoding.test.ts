import { describe, expect, it } from 'vitest';
import { decodeChroma, decodeLuma, encodeChroma, encodeLuma } from '../../../shared/colour/view-encoding';

// The encodings are Kinefold's own layout (DESIGN §7): luma round(L* × 2.55); chroma round((c + 128) × 256)
// in red (a*) and green (b*), blue 0. Expected codes below are computed from those formulas [C].
describe('luma view encoding', () => {
  it('maps L* 0..100 onto 0..255 with rounding and clamping', () => {
    const codes = encodeLuma(Float32Array.from([100, 0, 50, 53.585, 101, -1]));
    expect(Array.from(codes)).toEqual([255, 0, 128, 137, 255, 0]);
  });

  it('decodes to within half a code step', () => {
    const l = Float32Array.from({ length: 101 }, (_, i) => i);
    const back = decodeLuma(encodeLuma(l));
    l.forEach((v, i) => expect(Math.abs(back[i] - v)).toBeLessThanOrEqual(0.5 / 2.55 + 1e-6));
  });
});

describe('chroma view encoding', () => {
  it('stores a* in red and b* in green around 32768, blue 0', () => {
    const a = Float32Array.from([0, -128, 80.0925, 200]);
    const b = Float32Array.from([0, 127.99, -107.8602, -200]);
    const rgb = encodeChroma(a, b);
    expect(Array.from(rgb)).toEqual([32768, 32768, 0, 0, 65533, 0, 53272, 5156, 0, 65535, 0, 0]);
  });

  it('decodes to within half a code step (1/512)', () => {
    const a = Float32Array.from({ length: 65 }, (_, i) => -128 + i * 3.9);
    const b = a.map((v) => -v / 2);
    const outA = new Float32Array(a.length);
    const outB = new Float32Array(a.length);
    decodeChroma(encodeChroma(a, b), outA, outB);
    a.forEach((v, i) => expect(Math.abs(outA[i] - v)).toBeLessThanOrEqual(1 / 512 + 1e-5));
    b.forEach((v, i) => expect(Math.abs(outB[i] - v)).toBeLessThanOrEqual(1 / 512 + 1e-5));
  });

  it('refuses planes of different lengths', () => {
    expect(() => encodeChroma(new Float32Array(2), new Float32Array(3))).toThrow(RangeError);
  });
});
