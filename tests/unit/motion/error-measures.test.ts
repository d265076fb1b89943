import { describe, expect, it } from 'vitest';
import { angularErrorDegrees, averageErrors, endpointError } from '../../../worker/motion/fields/error-measures.js';
import { UNKNOWN_FLOW } from '../../../shared/motion/unknown-flow.js';

// Sources: Baker et al., "A Database and Evaluation Methodology for Optical Flow", IJCV 92(1), 2011; Barron,
// Fleet, Beauchemin, IJCV 12(1), 1994 (CHECK-VALUES §4, worked examples [C]).

describe('endpoint and angular error', () => {
  const examples: Array<[[number, number], [number, number], number, number]> = [
    [[1, 0], [0, 0], 1, 45],
    [[1, 0], [0, 1], Math.SQRT2, 60],
    [[2, 0], [1, 0], 1, 18.4349],
  ];
  for (const [[u, v], [ug, vg], epe, ae] of examples) {
    it(`(${u}, ${v}) vs (${ug}, ${vg}): EPE ${epe.toFixed(4)}, AE ${ae}°`, () => {
      // CHECK-VALUES §4 [C]
      expect(endpointError(u, v, ug, vg)).toBeCloseTo(epe, 12);
      expect(angularErrorDegrees(u, v, ug, vg)).toBeCloseTo(ae, 4);
    });
  }

  it('clamps the cosine so that equal vectors give 0°, not NaN', () => {
    // CHECK-VALUES §4 [V]: clamp to [−1, 1]. For (0.1, 0.7) the unclamped cosine rounds to just above 1 [C].
    const u = 0.1;
    const v = 0.7;
    const raw = (1 + u * u + v * v) / (Math.sqrt(1 + u * u + v * v) * Math.sqrt(1 + u * u + v * v));
    expect(raw).toBeGreaterThan(1);
    expect(angularErrorDegrees(u, v, u, v)).toBe(0);
  });
});

describe('average errors over a region', () => {
  const width = 4;
  const height = 3;
  const truth = new Float32Array(2 * width * height);
  const flow = new Float32Array(2 * width * height);
  // Interior pixels (1..2, 1) are (1, 0) against truth (0, 0); every other pixel is off by (0, 3).
  for (let p = 0; p < width * height; p++) flow[2 * p + 1] = 3;
  for (const x of [1, 2]) {
    const p = width + x;
    flow[2 * p] = 1;
    flow[2 * p + 1] = 0;
  }

  it('averages over the whole field', () => {
    const { aee, count } = averageErrors(flow, truth, width, height);
    expect(count).toBe(12);
    expect(aee).toBeCloseTo((10 * 3 + 2 * 1) / 12, 12);
  });

  it('leaves out a border (interior AEE)', () => {
    const { aee, aae, count } = averageErrors(flow, truth, width, height, { border: 1 });
    expect(count).toBe(2);
    expect(aee).toBe(1);
    expect(aae).toBeCloseTo(45, 10); // CHECK-VALUES §4 [C]: (1,0) vs (0,0) is 45°
  });

  it('counts only masked pixels and skips unknown truth', () => {
    const mask = new Uint8Array(width * height).fill(1);
    mask[0] = 0;
    const partlyUnknown = truth.slice();
    partlyUnknown[2] = UNKNOWN_FLOW; // pixel 1
    partlyUnknown[3] = UNKNOWN_FLOW;
    expect(averageErrors(flow, partlyUnknown, width, height, { mask }).count).toBe(10);
  });

  it('refuses an empty region rather than report a perfect score', () => {
    expect(() => averageErrors(flow, truth, width, height, { border: 2 })).toThrow(/no pixel/);
  });
});
