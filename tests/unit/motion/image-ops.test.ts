import { beforeAll, describe, expect, it } from 'vitest';
import { gaussianKernel, reflect101 } from '../../../worker/motion/kernels/gaussian-blur.js';
import { buildLevel, levelKernel, pyramidLevels, roundHalfEven } from '../../../worker/motion/kernels/pyramid.js';
import { resizeBilinear, sampleBilinear, warpBackward } from '../../../worker/motion/kernels/resample.js';
import { MotionWorkspace } from '../../../worker/motion/kernels/workspace.js';
import { makeMotionPair } from '../../helpers/motion-pairs.js';
import { loadOpenCv, type OpenCv } from './opencv-reference.js';

describe('Gaussian kernel and border', () => {
  it('uses OpenCV’s fixed kernels when no sigma is given', () => {
    // [M] OpenCV getGaussianKernel's small_gaussian_tab for sizes 3 and 5.
    expect(Array.from(gaussianKernel(3, 0))).toEqual([0.25, 0.5, 0.25]);
    expect(Array.from(gaussianKernel(5, 0))).toEqual([1 / 16, 4 / 16, 6 / 16, 4 / 16, 1 / 16]);
  });

  it('normalises exp(−x²/2σ²)', () => {
    // [C] size 3, σ = 0.5: weights e^−2, 1, e^−2 over their sum.
    const e = Math.exp(-2);
    const kernel = gaussianKernel(3, 0.5);
    expect(kernel[0]).toBeCloseTo(e / (1 + 2 * e), 7);
    expect(kernel[1]).toBeCloseTo(1 / (1 + 2 * e), 7);
  });

  it('reflects without repeating the edge pixel (BORDER_REFLECT_101)', () => {
    // [M] OpenCV's documented pattern gfedcb|abcdefgh|gfedcba.
    expect([-3, -2, -1, 0, 7, 8, 9, 10].map((i) => reflect101(i, 8))).toEqual([3, 2, 1, 0, 7, 6, 5, 4]);
  });

  it('rounds half to even like cvRound', () => {
    // [M] cvRound uses the current rounding mode (round half to even): 2.5 → 2, 22.5 → 22, 7.5 → 8.
    expect([2.5, 22.5, 7.5, 2.4, 2.6].map(roundHalfEven)).toEqual([2, 22, 8, 2, 3]);
  });
});

describe('pyramid levels', () => {
  it('stops before a side drops under 32 px, as OpenCV’s Farnebäck does', () => {
    // [C] 320×180: 160×90, 80×45, then 40×22.5 is under 32 → two levels above the frame.
    expect(pyramidLevels(320, 180, 5, 0.5).map((l) => [l.width, l.height])).toEqual([
      [320, 180],
      [160, 90],
      [80, 45],
    ]);
  });

  it('smooths each level with σ = (1/scale − 1)/2 over round(5σ)|1 ≥ 3 taps', () => {
    // [C] from the rule in optflowgf.cpp: scale 1/8 → σ 3.5, 19 taps; scale 1 → the fixed 3-tap kernel.
    expect(levelKernel(0.125).length).toBe(19);
    expect(Array.from(levelKernel(1))).toEqual([0.25, 0.5, 0.25]);
  });
});

describe('resampling', () => {
  it('aligns pixel centres when resizing, like OpenCV INTER_LINEAR', () => {
    // [C] 2 → 4 pixels: sources at −0.25 (clamped to 0), 0.25, 0.75, 1.25 (clamped to 1).
    const out = new Float32Array(4);
    resizeBilinear(Float32Array.from([0, 10]), 2, 1, out, 4, 1);
    expect(Array.from(out)).toEqual([0, 2.5, 7.5, 10]);
  });

  it('warps backward: out(x) = image(x + flow(x))', () => {
    // [C] a ramp image(x, y) = 10x + y, so bilinear sampling is exact inside the image.
    const width = 5;
    const height = 4;
    const image = new Float32Array(width * height);
    for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) image[y * width + x] = 10 * x + y;
    const flow = new Float32Array(2 * width * height);
    for (let p = 0; p < width * height; p++) {
      flow[2 * p] = 1.25;
      flow[2 * p + 1] = 0.5;
    }
    const out = new Float32Array(width * height);
    warpBackward(image, width, height, flow, out);
    expect(out[0]).toBeCloseTo(12.5 + 0.5, 5);
    expect(out[1 * width + 2]).toBeCloseTo(10 * 3.25 + 1.5, 5);
    // Past the right edge the edge pixel repeats: x = 4 + 1.25 → 4.
    expect(out[4]).toBeCloseTo(40 + 0.5, 5);
    expect(sampleBilinear(image, width, height, 3.25, 1.5)).toBeCloseTo(34, 5);
  });
});

describe('pyramid levels against OpenCV (GaussianBlur, then resize INTER_LINEAR)', () => {
  let cv: OpenCv;
  beforeAll(async () => {
    cv = (await loadOpenCv()).cv;
  });

  it('matches OpenCV at every level of an odd-sized frame', () => {
    // Reference: OpenCV 4.12 (WebAssembly build) running the same steps as optflowgf.cpp's pyramid.
    const width = 203;
    const height = 117;
    const frame = makeMotionPair(width, height, { kind: 'shift', dx: 0, dy: 0 }, 5).prev;
    const workspace = new MotionWorkspace();
    // A smaller minimum side than Farnebäck's 32 so that the 19-tap level (scale 1/8) is checked too.
    const MIN_SIDE = 12;
    expect(pyramidLevels(width, height, 3, 0.5, MIN_SIDE)).toHaveLength(4);
    for (const level of pyramidLevels(width, height, 3, 0.5, MIN_SIDE)) {
      const ours = new Float32Array(level.width * level.height);
      buildLevel(frame, width, height, level, ours, workspace);
      const kernel = levelKernel(level.scale);
      const sigma = (1 / level.scale - 1) * 0.5;
      const src = cv.matFromArray(height, width, cv.CV_32F, frame);
      const blurred = new cv.Mat();
      const resized = new cv.Mat();
      try {
        cv.GaussianBlur(src, blurred, new cv.Size(kernel.length, kernel.length), sigma, sigma, cv.BORDER_DEFAULT);
        cv.resize(blurred, resized, new cv.Size(level.width, level.height), 0, 0, cv.INTER_LINEAR);
        const reference = resized.data32F;
        let maxDifference = 0;
        for (let i = 0; i < ours.length; i++) maxDifference = Math.max(maxDifference, Math.abs(ours[i] - reference[i]));
        // Measured: 0 at full size, at most 6.1e-5 grey levels (float rounding order) on coarser levels.
        expect(maxDifference, `level ${level.width}x${level.height}`).toBeLessThan(1e-3);
      } finally {
        src.delete();
        blurred.delete();
        resized.delete();
      }
    }
  });
});
