import { describe, expect, it } from 'vitest';
import { averageErrors } from '../../../worker/motion/fields/error-measures.js';
import { ESTIMATOR_REGISTRY } from '../../../worker/motion/index.js';
import type { EstimatorName } from '../../../shared/estimators';
import { MotionWorkspace } from '../../../worker/motion/kernels/workspace.js';
import { makeMotionPair } from '../../helpers/motion-pairs.js';
import { BORDER, MOTION_CASES, SEED } from './motion-cases.js';

// Ground truth: the generated pairs move a procedural texture by a known warp, evaluated exactly at every pixel
// (CHECK-VALUES preamble: "the ground truth is the warp"). Interior AEE as in Baker et al., IJCV 2011.
// Thresholds are about 1.5× the measured AEE with default parameters (measured values in the comments), far
// below the AEE of a zero field (0.56 px for the smallest shift).

const LIMITS: Record<EstimatorName, Record<string, number>> = {
  farneback: {
    'shift (0.5, 0.25)': 0.03, // measured 0.0171
    'shift (2.5, −1.5)': 0.09, // measured 0.0614
    'rotation 2°': 0.11, // measured 0.0746
    'zoom 1.03': 0.1, // measured 0.0661
    'shift (5.5, −3.25)': 0.21, // measured 0.1434
  },
  'horn-schunck': {
    'shift (0.5, 0.25)': 0.035, // measured 0.0219
    'shift (2.5, −1.5)': 0.05, // measured 0.0312
    'rotation 2°': 0.035, // measured 0.0220
    'zoom 1.03': 0.03, // measured 0.0195
    'shift (5.5, −3.25)': 0.045, // measured 0.0286
  },
  'lucas-kanade': {
    'shift (0.5, 0.25)': 0.045, // measured 0.0310
    'shift (2.5, −1.5)': 0.05, // measured 0.0342
    'rotation 2°': 0.1, // measured 0.0667
    'zoom 1.03': 0.075, // measured 0.0493
    'shift (5.5, −3.25)': 0.045, // measured 0.0313
  },
  // The medium preset; the fast preset and a large motion are in dis.test.ts.
  dis: {
    'shift (0.5, 0.25)': 0.013, // measured 0.0087
    'shift (2.5, −1.5)': 0.047, // measured 0.0314
    'rotation 2°': 0.075, // measured 0.0503
    'zoom 1.03': 0.054, // measured 0.0359
    'shift (5.5, −3.25)': 0.03, // measured 0.0201
  },
};

describe.each(Object.keys(LIMITS) as EstimatorName[])('%s on generated pairs with known motion', (name) => {
  const entry = ESTIMATOR_REGISTRY[name];
  const workspace = new MotionWorkspace();
  for (const motionCase of MOTION_CASES) {
    const limit = LIMITS[name][motionCase.name];
    it(`${motionCase.name}: interior AEE < ${limit} px`, () => {
      const { width, height, warp } = motionCase;
      const pair = makeMotionPair(width, height, warp, SEED);
      const flow = entry.estimate(pair.prev, pair.next, width, height, entry.defaults as never, workspace);
      const { aee } = averageErrors(flow, pair.truth, width, height, { border: BORDER });
      const zeroField = averageErrors(new Float32Array(flow.length), pair.truth, width, height, { border: BORDER });
      expect(aee).toBeLessThan(limit);
      expect(aee).toBeLessThan(zeroField.aee / 10);
    });
  }
});
