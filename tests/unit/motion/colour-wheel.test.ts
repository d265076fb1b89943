import { describe, expect, it } from 'vitest';
import {
  COLOUR_WHEEL,
  WHEEL_COLOURS,
  colourOfMotion,
  colourWheelLegend,
  maxMotionRadius,
  motionToColour,
} from '../../../shared/motion/colour-wheel.js';
import { UNKNOWN_FLOW } from '../../../shared/motion/unknown-flow.js';

// Source: D. Scharstein, Middlebury `flow-code` colorcode.cpp and color_flow.cpp; expected colours from
// CHECK-VALUES §2 ([V] for the construction, [C] for the table of a faithful port).

function colour(u: number, v: number): number[] {
  const out = new Uint8Array(3);
  colourOfMotion(u, v, out, 0);
  return Array.from(out);
}

function pixel(rgb: Uint8Array, index: number): number[] {
  return Array.from(rgb.subarray(3 * index, 3 * index + 3));
}

describe('colour wheel construction', () => {
  it('has 55 entries from the segment lengths RY 15, YG 6, GC 4, CB 11, BM 13, MR 6', () => {
    // CHECK-VALUES §2 [V]
    expect(WHEEL_COLOURS).toBe(55);
    expect(COLOUR_WHEEL.length).toBe(55 * 3);
  });

  it('uses integer division for the entries', () => {
    // CHECK-VALUES §2 [V]: RY entry 1 = (255, 255·1/15, 0) = (255, 17, 0); BM entry 36+4 = (255·4/13 → 78, 0, 255)
    expect(Array.from(COLOUR_WHEEL.subarray(3, 6))).toEqual([255, 17, 0]);
    expect(Array.from(COLOUR_WHEEL.subarray(3 * 40, 3 * 41))).toEqual([78, 0, 255]);
    // The first entry of each segment: red, yellow, green, cyan, blue, magenta.
    const starts = [0, 15, 21, 25, 36, 49].map((k) => Array.from(COLOUR_WHEEL.subarray(3 * k, 3 * k + 3)));
    expect(starts).toEqual([
      [255, 0, 0],
      [255, 255, 0],
      [0, 255, 0],
      [0, 255, 255],
      [0, 0, 255],
      [255, 0, 255],
    ]);
  });
});

describe('colour of one motion vector (RGB)', () => {
  // CHECK-VALUES §2 [C]: the table of expected RGB values.
  const table: Array<[number, number, number[]]> = [
    [1, 0, [255, 0, 0]],
    [0, 1, [255, 229, 0]],
    [-1, 0, [0, 209, 255]],
    [0, -1, [88, 0, 255]],
    [0, 0, [255, 255, 255]],
    [0.5, 0, [255, 127, 127]],
    [Math.SQRT1_2, Math.SQRT1_2, [255, 114, 0]],
    [2, 0, [191, 0, 0]],
  ];
  for (const [u, v, rgb] of table) {
    it(`(${u.toFixed(3)}, ${v.toFixed(3)}) → (${rgb.join(', ')})`, () => {
      expect(colour(u, v)).toEqual(rgb);
    });
  }

  it('(1, −0) → (255, 0, 43): the sign of zero flips atan2', () => {
    // CHECK-VALUES §2 [C]: the −0 trap.
    expect(colour(1, -0)).toEqual([255, 0, 43]);
    expect(colour(1, 0)).toEqual([255, 0, 0]);
  });
});

describe('colour picture of a field', () => {
  it('normalises by the largest radius among known pixels', () => {
    // CHECK-VALUES §2 [V]: color_flow.cpp divides by maxrad over known pixels; unknown pixels are black.
    const field = Float32Array.from([2, 0, 1, 0, UNKNOWN_FLOW, UNKNOWN_FLOW]);
    const { rgb, maxMotion } = motionToColour(field);
    expect(maxMotion).toBe(2);
    expect(pixel(rgb, 0)).toEqual([255, 0, 0]); // (2, 0)/2 = (1, 0)
    expect(pixel(rgb, 1)).toEqual([255, 127, 127]); // (1, 0)/2 = (0.5, 0)
    expect(pixel(rgb, 2)).toEqual([0, 0, 0]);
  });

  it('uses a given maximum instead, so pictures of one clip share a scale', () => {
    // CHECK-VALUES §2 [V]: maxmotion overrides the field's own maximum.
    const { rgb, maxMotion } = motionToColour(Float32Array.from([2, 0, 1, 0]), 4);
    expect(maxMotion).toBe(4);
    expect(pixel(rgb, 0)).toEqual([255, 127, 127]); // (0.5, 0)
    expect(pixel(rgb, 1)).toEqual(colour(0.25, 0));
  });

  it('shows out-of-range motion dimmed when the given maximum is smaller', () => {
    // CHECK-VALUES §2 [C]: (2, 0) not normalised → (191, 0, 0).
    expect(pixel(motionToColour(Float32Array.from([2, 0]), 1).rgb, 0)).toEqual([191, 0, 0]);
  });

  it('paints a motionless field white (maximum radius 0 is replaced by 1)', () => {
    // CHECK-VALUES §2 [V]: "if (maxrad == 0) maxrad = 1".
    const { rgb, maxMotion } = motionToColour(new Float32Array(8));
    expect(maxMotion).toBe(1);
    expect(Array.from(rgb)).toEqual(new Array(12).fill(255));
  });

  it('leaves unknown pixels out of the maximum radius', () => {
    expect(maxMotionRadius(Float32Array.from([3, 4, UNKNOWN_FLOW, 0, Number.NaN, 1]))).toBe(5);
  });

  it('refuses an output buffer of the wrong size', () => {
    expect(() => motionToColour(new Float32Array(4), undefined, new Uint8Array(5))).toThrow(/6 needed/);
  });
});

describe('legend', () => {
  it('is white at the centre and full red at the right edge of the inscribed circle', () => {
    const size = 65;
    const legend = colourWheelLegend(size);
    const centre = (size - 1) / 2;
    expect(legend.length).toBe(size * size * 3);
    expect(pixel(legend, centre * size + centre)).toEqual([255, 255, 255]);
    expect(pixel(legend, centre * size + size - 1)).toEqual(colour(1, 0));
    // Image y points down, so the bottom edge is the colour of (0, 1).
    expect(pixel(legend, (size - 1) * size + centre)).toEqual(colour(0, 1));
  });
});
