import { beforeAll, describe, expect, it } from 'vitest';
import { resizeArea } from '../../../shared/pairing/area-resize';
import { mulberry32 } from '../../../shared/pairing/seeded-random';
import { loadOpenCv, type OpenCv } from '../signals/opencv';

let cv: OpenCv;

beforeAll(async () => {
  ({ cv } = await loadOpenCv());
});

function openCvArea(src: Float32Array, width: number, height: number, outWidth: number, outHeight: number): number[] {
  const mat = cv.matFromArray(height, width, cv.CV_32F, Array.from(src));
  const out = new cv.Mat();
  cv.resize(mat, out, new cv.Size(outWidth, outHeight), 0, 0, cv.INTER_AREA);
  const values = Array.from(out.data32F);
  mat.delete();
  out.delete();
  return values;
}

describe('area-averaging resize', () => {
  it('averages 2×2 blocks when halving', () => {
    // Block means of a 4×4 ramp 0..15 [C].
    const src = Float32Array.from({ length: 16 }, (_, i) => i);
    expect(Array.from(resizeArea(src, 4, 4, 2, 2))).toEqual([2.5, 4.5, 10.5, 12.5]);
  });

  it('weights partly covered pixels by the covered fraction (3×5 → 2×2)', () => {
    // Output (0, 0) covers columns [0, 2.5) and rows [0, 1.5) of values 5r + c: 5·(1/3) + 0.8 = 2.4667 [C];
    // OpenCV INTER_AREA gives the same (checked below).
    const src = Float32Array.from({ length: 15 }, (_, i) => i);
    const ours = resizeArea(src, 5, 3, 2, 2);
    expect(ours[0]).toBeCloseTo(5 / 3 + 0.8, 5);
  });

  it('agrees with OpenCV resize(INTER_AREA) when shrinking by non-integer ratios', () => {
    // Cross-check against OpenCV.js `cv.resize(…, INTER_AREA)`, including the 9×8 size of the difference hash.
    const random = mulberry32(21);
    for (const [w, h, ow, oh] of [
      [5, 3, 2, 2],
      [37, 23, 9, 8],
      [64, 48, 16, 16],
      [100, 30, 7, 5],
    ]) {
      const src = Float32Array.from({ length: w * h }, () => random() * 255);
      const theirs = openCvArea(src, w, h, ow, oh);
      const ours = resizeArea(src, w, h, ow, oh);
      theirs.forEach((v, i) => expect(Math.abs(ours[i] - v)).toBeLessThan(1e-3));
    }
  });

  it('keeps a constant image constant and refuses bad sizes', () => {
    const out = resizeArea(new Float32Array(35).fill(7), 7, 5, 3, 2);
    out.forEach((v) => expect(v).toBeCloseTo(7, 5));
    expect(() => resizeArea(new Float32Array(4), 2, 2, 0, 1)).toThrow(RangeError);
    expect(() => resizeArea(new Float32Array(3), 2, 2, 1, 1)).toThrow(RangeError);
  });
});
