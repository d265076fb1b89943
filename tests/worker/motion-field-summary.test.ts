import { describe, expect, it } from 'vitest';
import { UNKNOWN_FLOW } from '../../shared/motion/unknown-flow';
import { medianMotion, summariseField } from '../../worker/motion/fields/field-summary';

/** Interleaved (u, v) from pairs. */
const field = (vectors: [number, number][]) => Float32Array.from(vectors.flat());

describe('global motion (median vector)', () => {
  it('is the nearest-rank median of u and of v over known pixels', () => {
    // u = 1, 2, 3, 100 → ⌈4/2⌉ = 2nd smallest = 2; v = −1, 0, 0, 7 → 0 [C]. The unknown pixel is left out.
    const flow = field([
      [3, 0],
      [1, 7],
      [100, -1],
      [2, 0],
      [UNKNOWN_FLOW, UNKNOWN_FLOW],
    ]);
    expect(medianMotion(flow, new Float32Array(5))).toEqual({ medianU: 2, medianV: 0 });
  });

  it('follows the camera and ignores an object moving over less than half the picture', () => {
    const flow = field([
      [-5, 0],
      [-5, 0],
      [-5, 0],
      [12, 9],
      [12, 9],
    ]);
    expect(medianMotion(flow, new Float32Array(5))).toEqual({ medianU: -5, medianV: 0 });
  });

  it('is (0, 0) when no pixel is known', () => {
    expect(medianMotion(field([[Number.NaN, 0]]), new Float32Array(1))).toEqual({ medianU: 0, medianV: 0 });
  });
});

describe('field summary', () => {
  it('gives mean, nearest-rank p95 (all and consistent pixels), consistent share, median vector, maximum', () => {
    // Magnitudes 5 (3-4-5 triangle), 0, 10 (6-8-10) and 5: mean 5, p95 = ⌈0.95·4⌉ = 4th smallest = 10, max 10 [C].
    // The 10 is inconsistent: over 5, 0, 5 the p95 is the ⌈0.95·3⌉ = 3rd smallest, 5 [C].
    const flow = field([
      [3, 4],
      [0, 0],
      [6, 8],
      [-3, -4],
    ]);
    const summary = summariseField(flow, Uint8Array.from([1, 1, 0, 1]), new Float32Array(4));
    expect(summary).toEqual({
      meanMagnitude: 5,
      p95Magnitude: 10,
      consistentP95Magnitude: 5,
      consistentShare: 0.75,
      medianU: 0,
      medianV: 0,
      maxMagnitude: 10,
    });
  });
});
