import { describe, expect, it } from 'vitest';
import { rgbToGrey } from '../../../shared/colour/grey';
import { mulberry32 } from '../../../shared/pairing/seeded-random';
import { UNKNOWN_FLOW } from '../../../shared/motion/unknown-flow';
import { APPEARANCE_DIMS, MOTION_DIMS } from '../../../shared/diversity/descriptor-layout';
import {
  appearanceDescriptor,
  motionDescriptor,
  orientationHistogram,
} from '../../../worker/signals/moment-descriptor';
import { numpyOrientationHistogram } from '../../helpers/sklearn-reference';

function solid(width: number, height: number, [r, g, b]: [number, number, number]): Uint8Array {
  const rgb = new Uint8Array(width * height * 3);
  for (let p = 0; p < width * height; p += 1) rgb.set([r, g, b], p * 3);
  return rgb;
}

describe('appearance descriptor', () => {
  // sRGB (255, 0, 0) is L* 53.24, a* 80.09, b* 67.20 under D65 (Lindbloom's colour calculator [M]).
  it('gives the L*a*b* of a solid red frame, no spread, no gradients', () => {
    const rgb = solid(8, 6, [255, 0, 0]);
    const grey = rgbToGrey(rgb, new Float32Array(48));
    const descriptor = appearanceDescriptor(rgb, grey, 8, 6, 0);
    expect(descriptor).toHaveLength(APPEARANCE_DIMS);
    expect(descriptor[0]).toBeCloseTo(53.24, 1);
    expect(descriptor[1]).toBeCloseTo(80.09, 1);
    expect(descriptor[2]).toBeCloseTo(67.2, 1);
    expect([...descriptor.slice(3, 14)].every((value) => Math.abs(value) < 1e-4)).toBe(true);
    expect(descriptor[14]).toBe(0);
  });

  it('gives the mean and spread of half black, half white (L* 0 and 100)', () => {
    const rgb = new Uint8Array(4 * 2 * 3);
    rgb.fill(255, 0, 12);
    const descriptor = appearanceDescriptor(rgb, rgbToGrey(rgb, new Float32Array(8)), 4, 2, Math.E - 1);
    expect(descriptor[0]).toBeCloseTo(50, 3);
    expect(descriptor[3]).toBeCloseTo(50, 3);
    expect(descriptor[14]).toBeCloseTo(1, 6);
  });
});

describe('gradient orientation histogram', () => {
  it('puts vertical stripes in the first bin and horizontal ones in the middle bin', () => {
    const width = 12;
    const height = 10;
    const vertical = Float32Array.from({ length: width * height }, (_, p) => ((p % width) % 4 < 2 ? 0 : 200));
    const horizontal = Float32Array.from({ length: width * height }, (_, p) =>
      Math.floor(p / width) % 4 < 2 ? 0 : 200,
    );
    expect(orientationHistogram(vertical, width, height)[0]).toBeCloseTo(1, 12);
    expect(orientationHistogram(horizontal, width, height)[4]).toBeCloseTo(1, 12);
    expect([...orientationHistogram(new Float32Array(width * height), width, height)]).toEqual(new Array(8).fill(0));
  });

  // Reference: numpy (Debian python3-numpy) — arctan2 mod π and a weighted np.histogram over the same gradients.
  it('matches numpy on a random frame', () => {
    const random = mulberry32(4);
    const grey = Float32Array.from({ length: 40 * 30 }, () => Math.floor(random() * 256));
    const ours = orientationHistogram(grey, 40, 30);
    numpyOrientationHistogram(grey, 40, 30, 8).forEach((value, bin) => expect(ours[bin]).toBeCloseTo(value, 10));
  });
});

describe('motion descriptor', () => {
  it('measures the mean magnitude and direction of a uniform field, skipping unknown pixels', () => {
    // Four pixels: (3, 0), (0, 3), (0, 3) and one unknown. Mean magnitude 3; directions 0 and +90°.
    const flow = Float32Array.from([3, 0, 0, 3, 0, 3, UNKNOWN_FLOW, UNKNOWN_FLOW]);
    const descriptor = motionDescriptor(flow);
    expect(descriptor).toHaveLength(MOTION_DIMS);
    expect(descriptor[0]).toBeCloseTo(Math.log1p(3), 6);
    // Bins of 45° from −180°: 0° starts bin 4, +90° starts bin 6.
    expect(descriptor[1 + 4]).toBeCloseTo(1 / 3, 6);
    expect(descriptor[1 + 6]).toBeCloseTo(2 / 3, 6);
  });

  it('is all zero for a still field', () => {
    expect([...motionDescriptor(new Float32Array(20))]).toEqual(new Array(MOTION_DIMS).fill(0));
  });
});
