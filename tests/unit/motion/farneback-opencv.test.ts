import { beforeAll, describe, expect, it } from 'vitest';
import { averageErrors } from '../../../worker/motion/fields/error-measures.js';
import {
  FARNEBACK_DEFAULTS,
  estimateFarneback,
  type FarnebackParams,
} from '../../../worker/motion/farneback/farneback.js';
import { MotionWorkspace } from '../../../worker/motion/kernels/workspace.js';
import { makeMotionPair } from '../../helpers/motion-pairs.js';
import { BORDER, MOTION_CASES, SEED } from './motion-cases.js';
import { OPTFLOW_FARNEBACK_GAUSSIAN, loadOpenCv, withMat, type OpenCv } from './opencv-reference.js';
import { fieldDifference } from './field-difference.js';

// Reference implementation: OpenCV 4.12's calcOpticalFlowFarneback (video/src/optflowgf.cpp), run as
// WebAssembly from @techstark/opencv-js on the same float frames with the same parameters.

function openCvFarneback(
  cv: OpenCv,
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  p: FarnebackParams,
): Float32Array {
  return withMat(cv, prev, height, width, (a) =>
    withMat(cv, next, height, width, (b) => {
      const flow = new cv.Mat();
      try {
        const flags = p.gaussianWindow ? OPTFLOW_FARNEBACK_GAUSSIAN : 0;
        const { pyrScale, levels, winSize, iterations, polyN, polySigma } = p;
        cv.calcOpticalFlowFarneback(a, b, flow, pyrScale, levels, winSize, iterations, polyN, polySigma, flags);
        return new Float32Array(flow.data32F);
      } finally {
        flow.delete();
      }
    }),
  );
}

describe('farneback against OpenCV’s Farnebäck', () => {
  let cv: OpenCv;
  const workspace = new MotionWorkspace();
  beforeAll(async () => {
    cv = (await loadOpenCv()).cv;
  });

  for (const motionCase of MOTION_CASES) {
    it(`${motionCase.name}: AEE within 10% of OpenCV’s and the same field pixel by pixel`, () => {
      const { width, height, warp } = motionCase;
      const pair = makeMotionPair(width, height, warp, SEED);
      const ours = estimateFarneback(pair.prev, pair.next, width, height, FARNEBACK_DEFAULTS, workspace);
      const reference = openCvFarneback(cv, pair.prev, pair.next, width, height, FARNEBACK_DEFAULTS);
      const oursAee = averageErrors(ours, pair.truth, width, height, { border: BORDER }).aee;
      const referenceAee = averageErrors(reference, pair.truth, width, height, { border: BORDER }).aee;
      expect(Math.abs(oursAee - referenceAee)).toBeLessThan(0.1 * referenceAee);
      // Measured: mean difference 3e-7 to 6e-7 px, largest 1.6e-6 to 8.4e-6 px (float rounding order only).
      const difference = fieldDifference(ours, reference);
      expect(difference.mean).toBeLessThan(1e-5);
      expect(difference.max).toBeLessThan(1e-4);
    });
  }

  it('matches with a Gaussian window, polyN 7, an even window, pyrScale 0.6 and an odd frame size', () => {
    const params: FarnebackParams = {
      pyrScale: 0.6,
      levels: 4,
      winSize: 10,
      iterations: 4,
      polyN: 7,
      polySigma: 1.5,
      gaussianWindow: true,
    };
    const width = 301;
    const height = 197;
    const pair = makeMotionPair(width, height, { kind: 'zoom', factor: 1.05 }, SEED);
    const ours = estimateFarneback(pair.prev, pair.next, width, height, params, workspace);
    const reference = openCvFarneback(cv, pair.prev, pair.next, width, height, params);
    // Measured: mean difference 8e-7 px.
    expect(fieldDifference(ours, reference).mean).toBeLessThan(1e-5);
  });
});
