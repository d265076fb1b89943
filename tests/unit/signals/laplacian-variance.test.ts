import { beforeAll, describe, expect, it } from 'vitest';
import { laplacianVariance } from '../../../worker/signals/laplacian-variance';
import { loadOpenCv, type OpenCv } from './opencv';
import { texturedGrey } from './synthetic-frames';

let cv: OpenCv;

beforeAll(async () => {
  ({ cv } = await loadOpenCv());
});

describe('variance of the Laplacian', () => {
  it('is 0 on a constant image', () => {
    // CHECK-VALUES §9 [C]: a constant image has a zero Laplacian everywhere, borders included.
    expect(laplacianVariance(new Float32Array(7 * 5).fill(93), 7, 5)).toBe(0);
  });

  it('is 0.8 on a 5×5 zero image with a centre 1', () => {
    // CHECK-VALUES §9 [C]: the kernel [[0,1,0],[1,−4,1],[0,1,0]] gives −4 at the centre and 1 at its four
    // neighbours, so the mean is 0 and the variance (16 + 4) / 25 = 0.8.
    const grey = new Float32Array(25);
    grey[12] = 1;
    expect(laplacianVariance(grey, 5, 5)).toBeCloseTo(0.8, 12);
  });

  it('agrees with OpenCV Laplacian (ksize 1, BORDER_DEFAULT = REFLECT_101) and meanStdDev', () => {
    // Cross-check: `cv2.Laplacian(gray, ddepth).var()` as in Pech-Pacheco et al. 2000 practice (CHECK-VALUES §9),
    // through OpenCV.js with ksize 1 and the default border; odd sizes exercise every border case.
    const width = 37;
    const height = 23;
    const grey = texturedGrey(width, height, 11, { mean: 120, amplitude: 90 });
    const src = cv.matFromArray(height, width, cv.CV_32F, Array.from(grey));
    const lap = new cv.Mat();
    const mean = new cv.Mat();
    const std = new cv.Mat();
    cv.Laplacian(src, lap, cv.CV_32F, 1, 1, 0, cv.BORDER_DEFAULT);
    cv.meanStdDev(lap, mean, std);
    const reference = std.doubleAt(0, 0) ** 2;
    [src, lap, mean, std].forEach((m) => m.delete());
    expect(reference).toBeGreaterThan(100);
    expect(Math.abs(laplacianVariance(grey, width, height) - reference) / reference).toBeLessThan(1e-5);
  });

  it('handles one-pixel-wide images and refuses mismatched sizes', () => {
    expect(laplacianVariance(Float32Array.from([1, 2, 3]), 1, 3)).toBeGreaterThanOrEqual(0);
    expect(() => laplacianVariance(new Float32Array(10), 3, 3)).toThrow(RangeError);
  });
});
