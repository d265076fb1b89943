import { describe, expect, it } from 'vitest';
import { CONSISTENCY_DEFAULTS, forwardBackwardConsistency } from '../../../worker/motion/fields/consistency.js';
import { fieldStatistics, nearestRankPercentile } from '../../../worker/motion/fields/field-statistics.js';
import { UNKNOWN_FLOW } from '../../../shared/motion/unknown-flow.js';

// Source: Sundaram, Brox, Keutzer, "Dense Point Trajectories by GPU-Accelerated Large Displacement Optical
// Flow", ECCV 2010: consistent when |w_f + w_b|² < 0.01(|w_f|² + |w_b|²) + 0.5 [M: constants as commonly quoted
// from the paper; the expected values below are computed [C] from that formula].

const WIDTH = 12;
const HEIGHT = 9;

function constantField(u: number, v: number): Float32Array {
  const field = new Float32Array(2 * WIDTH * HEIGHT);
  for (let p = 0; p < WIDTH * HEIGHT; p++) {
    field[2 * p] = u;
    field[2 * p + 1] = v;
  }
  return field;
}

describe('forward–backward consistency', () => {
  it('uses α = 0.01 and β = 0.5', () => {
    expect(CONSISTENCY_DEFAULTS).toEqual({ alpha: 0.01, beta: 0.5 });
  });

  it('finds opposite fields consistent wherever the forward motion stays in the frame', () => {
    // [C] (2, 1) then (−2, −1) returns exactly; pixels with x + 2 > 11 or y + 1 > 8 leave the frame.
    const forward = constantField(2, 1);
    const { mask, consistentShare } = forwardBackwardConsistency(forward, constantField(-2, -1), WIDTH, HEIGHT);
    const expected = ((WIDTH - 2) * (HEIGHT - 1)) / (WIDTH * HEIGHT);
    expect(consistentShare).toBeCloseTo(expected, 12);
    expect(mask[0]).toBe(1);
    expect(mask[WIDTH - 1]).toBe(0);
    expect(mask[(HEIGHT - 1) * WIDTH]).toBe(0);
  });

  it('finds zero fields consistent everywhere', () => {
    const zero = constantField(0, 0);
    expect(forwardBackwardConsistency(zero, zero, WIDTH, HEIGHT).consistentShare).toBe(1);
  });

  it('finds mismatched fields inconsistent', () => {
    // [C] (2, 1) then (2, 1): |(4, 2)|² = 20 ≥ 0.01·10 + 0.5.
    const { consistentShare } = forwardBackwardConsistency(constantField(2, 1), constantField(2, 1), WIDTH, HEIGHT);
    expect(consistentShare).toBe(0);
  });

  it('puts the threshold where the formula does', () => {
    // [C] forward (2, 1), backward (−2 + d, −1): loop d², tolerance 0.01(5 + (2 − d)² + 1) + 0.5.
    // d = 0.7: 0.49 < 0.5769 → consistent; d = 0.8: 0.64 ≥ 0.5744 → inconsistent.
    const forward = constantField(2, 1);
    expect(forwardBackwardConsistency(forward, constantField(-1.3, -1), WIDTH, HEIGHT).mask[0]).toBe(1);
    expect(forwardBackwardConsistency(forward, constantField(-1.2, -1), WIDTH, HEIGHT).mask[0]).toBe(0);
  });

  it('reads the backward field at the displaced position, bilinearly', () => {
    // [C] Backward −1 at x ≤ 5, −2 beyond; forward 0.5 from x = 5 lands halfway, reads −1.5: loop 1.0 ≥ 0.525.
    const forward = constantField(0.5, 0);
    const backward = constantField(-1, 0);
    for (let y = 0; y < HEIGHT; y++) for (let x = 6; x < WIDTH; x++) backward[2 * (y * WIDTH + x)] = -2;
    const { mask } = forwardBackwardConsistency(forward, backward, WIDTH, HEIGHT);
    expect(mask[4]).toBe(1); // lands at 4.5 → −1, loop 0.25 < 0.5 + 0.0125
    expect(mask[5]).toBe(0); // lands at 5.5 → −1.5, loop 1.0
  });

  it('marks pixels with unknown forward motion inconsistent', () => {
    const forward = constantField(0, 0);
    forward[0] = UNKNOWN_FLOW;
    expect(forwardBackwardConsistency(forward, constantField(0, 0), WIDTH, HEIGHT).mask[0]).toBe(0);
  });
});

describe('field statistics', () => {
  it('takes the nearest-rank percentile', () => {
    // [M] the nearest-rank worked example of the Wikipedia "Percentile" article: for {15, 20, 35, 40, 50},
    // the 5th, 30th, 40th, 50th and 100th percentiles are 15, 20, 20, 35 and 50.
    const cases: Array<[number, number]> = [
      [0.05, 15],
      [0.3, 20],
      [0.4, 20],
      [0.5, 35],
      [1, 50],
    ];
    for (const [p, expected] of cases) {
      expect(nearestRankPercentile(Float32Array.from([40, 15, 50, 35, 20]), 5, p), `p=${p}`).toBe(expected);
    }
  });

  it('gives mean, 95th percentile and consistent share of a field', () => {
    // [C] magnitudes 1..100 (as (k, 0) shuffled): mean 50.5, nearest-rank p95 = the 95th smallest = 95.
    const count = 100;
    const field = new Float32Array(2 * count);
    for (let i = 0; i < count; i++) field[2 * i + 1] = ((i * 37) % count) + 1; // a permutation of 1..100
    const mask = new Uint8Array(count);
    mask.fill(1, 0, 30);
    const stats = fieldStatistics(field, mask);
    expect(stats.meanMagnitude).toBeCloseTo(50.5, 10);
    expect(stats.p95Magnitude).toBe(95);
    expect(stats.consistentShare).toBeCloseTo(0.3, 12);
    expect(stats.count).toBe(count);
  });

  it('leaves unknown pixels out and has no share without a mask', () => {
    const stats = fieldStatistics(Float32Array.from([3, 4, UNKNOWN_FLOW, UNKNOWN_FLOW]));
    expect(stats.meanMagnitude).toBe(5);
    expect(stats.p95Magnitude).toBe(5);
    expect(stats.count).toBe(1);
    expect(stats.consistentShare).toBeNull();
  });
});
