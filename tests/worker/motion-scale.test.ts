import { describe, expect, it } from 'vitest';
import { clipMotionScale, type ScaledField } from '../../shared/motion/motion-scale';
import { consistentP95Magnitude } from '../../worker/motion/fields/consistent-magnitude';

/** A forward field from frame `fromIndex` whose consistent vectors reach `p95` px a step. */
const field = (fromIndex: number, p95: number, consistentShare = 0.9): ScaledField => ({
  fromIndex,
  p95Magnitude: p95 + 1,
  consistentP95Magnitude: p95,
  consistentShare,
});

describe('the motion scale of a clip', () => {
  it('leaves out the pair across a cut known from the frames table, so a 67 px jump cannot wash the clip out', () => {
    // The demo's paused-and-resumed clip: a steady pan of about 5 px a step and one pair, 5 → 6, across the cut.
    const fields = [4.8, 5.1, 5, 4.9, 5.2, 67.3, 5, 5.1].map((p95, t) => field(t, p95));
    expect(clipMotionScale(fields, new Set([6]))).toEqual({
      pxPerStep: 5.2,
      fieldCount: 7,
      acrossCut: 1,
      inconsistent: 0,
      outliers: 0,
      consistentOnly: true,
    });
  });

  it('takes each field by its consistent vectors and leaves out fields that are mostly inconsistent', () => {
    const fields = [field(0, 3), field(1, 4), { ...field(2, 40), consistentShare: 0.2 }];
    // Field 1's p95 over every vector is 5; over its consistent ones 4, which is what counts.
    expect(clipMotionScale(fields, new Set())).toMatchObject({ pxPerStep: 4, fieldCount: 2, inconsistent: 1 });
  });

  it("drops fields beyond Tukey's outer fence Q3 + 3·IQR, then takes the largest", () => {
    // Figures 4, 5, 5, 5, 6, 6, 30: nearest-rank Q1 = 2nd smallest = 5, Q3 = ⌈0.75·7⌉ = 6th = 6, fence 6 + 3·1 = 9
    // (Tukey, Exploratory Data Analysis, 1977, for the fence; the arithmetic worked by hand [C]): 30 is far out.
    const fields = [4, 5, 5, 5, 6, 6, 30].map((p95, t) => field(t, p95));
    expect(clipMotionScale(fields, new Set())).toMatchObject({ pxPerStep: 6, fieldCount: 6, outliers: 1 });
  });

  it('keeps a fast clip fast: fields that all move a lot are no outliers', () => {
    const fields = [20, 22, 25, 21, 24].map((p95, t) => field(t, p95));
    expect(clipMotionScale(fields, new Set())).toMatchObject({ pxPerStep: 25, outliers: 0 });
  });

  it('falls back to the 95th percentile of every vector for fields stored before the consistent one existed', () => {
    const old = { fromIndex: 0, p95Magnitude: 6, consistentP95Magnitude: null, consistentShare: 0.8 };
    expect(clipMotionScale([old], new Set())).toMatchObject({ pxPerStep: 6, consistentOnly: false });
  });

  it('is null for a clip without fields or whose every field crosses a cut, and 0 for fields without motion', () => {
    expect(clipMotionScale([], new Set())).toBeNull();
    expect(clipMotionScale([field(0, 9)], new Set([1]))).toBeNull();
    expect(clipMotionScale([field(0, 0)], new Set())?.pxPerStep).toBe(0);
  });
});

describe('the 95th percentile of consistent vectors', () => {
  it('counts only pixels that pass the forward–backward check', () => {
    // 100 pixels: 90 consistent ones moving 1, 2, …, 90 px to the right, 10 inconsistent ones moving 500 px.
    // Nearest rank over the 90: ⌈0.95·90⌉ = 86th smallest = 86 [C]; over all 100 it would be 500.
    const flow = new Float32Array(200);
    const mask = new Uint8Array(100);
    for (let p = 0; p < 100; p++) {
      flow[2 * p] = p < 90 ? p + 1 : 500;
      mask[p] = p < 90 ? 1 : 0;
    }
    expect(consistentP95Magnitude(flow, mask, new Float32Array(100))).toBe(86);
  });

  it('is 0 when no pixel passes', () => {
    expect(consistentP95Magnitude(Float32Array.from([3, 4]), Uint8Array.from([0]), new Float32Array(1))).toBe(0);
  });
});
