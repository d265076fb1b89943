import { describe, expect, it } from 'vitest';
import { frameSignals } from '../../../worker/signals/frame-signals';

// Expected values follow from the definitions in frame-signals.ts [C]: RMS contrast as the population standard
// deviation of intensities scaled to 0..1 (Peli 1990 [M]); clipped pixels ≤ 2 or ≥ 253 (common practice).
describe('frame signals', () => {
  it('reports a flat mid-grey frame as zero contrast with nothing clipped', () => {
    const s = frameSignals(new Float32Array(12).fill(128), 4, 3);
    expect(s).toEqual({
      meanLuma: 128,
      contrast: 0,
      sharpness: 0,
      clippedShare: 0,
      clippedLowShare: 0,
      clippedHighShare: 0,
    });
  });

  it('reports a half black, half white frame as contrast 0.5, all of it clipped', () => {
    const grey = Float32Array.from({ length: 16 }, (_, i) => (i % 4 < 2 ? 0 : 255));
    const s = frameSignals(grey, 4, 4);
    expect(s.meanLuma).toBe(127.5);
    expect(s.contrast).toBeCloseTo(0.5, 12);
    expect(s.clippedLowShare).toBe(0.5);
    expect(s.clippedHighShare).toBe(0.5);
    expect(s.clippedShare).toBe(1);
    expect(s.sharpness).toBeGreaterThan(0);
  });

  it('counts clipping on the rounded 8-bit code: ≤ 2 and ≥ 253', () => {
    const grey = Float32Array.from([2.4, 2.6, 252.4, 252.6]);
    const s = frameSignals(grey, 4, 1);
    expect(s.clippedLowShare).toBe(0.25);
    expect(s.clippedHighShare).toBe(0.25);
  });
});
