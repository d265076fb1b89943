import { beforeAll, describe, expect, it } from 'vitest';
import { rgbToGrey } from '../../../shared/colour/grey';
import { mulberry32 } from '../../../shared/pairing/seeded-random';
import { loadOpenCv, type OpenCv } from '../signals/opencv';

let cv: OpenCv;

beforeAll(async () => {
  ({ cv } = await loadOpenCv());
});

describe('grey (BT.601 luma)', () => {
  it('weights pure primaries 0.299 / 0.587 / 0.114', () => {
    // OpenCV "Color conversions", RGB → GRAY: Y = 0.299 R + 0.587 G + 0.114 B [V]; [C] for 255 × each weight.
    const grey = rgbToGrey(Uint8Array.from([255, 0, 0, 0, 255, 0, 0, 0, 255, 255, 255, 255]), new Float32Array(4));
    expect(grey[0]).toBeCloseTo(76.245, 4);
    expect(grey[1]).toBeCloseTo(149.685, 4);
    expect(grey[2]).toBeCloseTo(29.07, 4);
    expect(grey[3]).toBeCloseTo(255, 4);
  });

  it('agrees with OpenCV cvtColor(RGB2GRAY) to within its 8-bit rounding', () => {
    // Cross-check against OpenCV.js `cv.cvtColor(…, COLOR_RGB2GRAY)`, which rounds to 8 bits (and computes in
    // fixed point), so the unrounded grey may differ by at most about half a code value.
    const random = mulberry32(7);
    const width = 31;
    const height = 17;
    const rgb = Uint8Array.from({ length: width * height * 3 }, () => Math.floor(random() * 256));
    const ours = rgbToGrey(rgb, new Float32Array(width * height));
    const src = cv.matFromArray(height, width, cv.CV_8UC3, Array.from(rgb));
    const dst = new cv.Mat();
    cv.cvtColor(src, dst, cv.COLOR_RGB2GRAY);
    const theirs = Array.from(dst.data);
    src.delete();
    dst.delete();
    const worst = Math.max(...theirs.map((v, i) => Math.abs(v - ours[i])));
    expect(worst).toBeLessThanOrEqual(0.51);
  });

  it('refuses a grey buffer of the wrong size', () => {
    expect(() => rgbToGrey(new Uint8Array(9), new Float32Array(2))).toThrow(RangeError);
  });
});
