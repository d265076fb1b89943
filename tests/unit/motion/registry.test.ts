import { describe, expect, it } from 'vitest';
import { FARNEBACK_DEFAULTS, estimateFarneback } from '../../../worker/motion/farneback/farneback.js';
import { estimateMotion, isEstimator, resolveParams } from '../../../worker/motion/index.js';
import { ESTIMATORS } from '../../../shared/estimators';
import { makeMotionPair } from '../../helpers/motion-pairs.js';

describe('estimator registry', () => {
  it('names the four estimators', () => {
    expect(ESTIMATORS).toEqual(['farneback', 'horn-schunck', 'lucas-kanade', 'dis']);
    expect(isEstimator('farneback')).toBe(true);
    expect(isEstimator('dis')).toBe(true);
    expect(isEstimator('rlof')).toBe(false);
    expect(isEstimator('toString')).toBe(false);
  });

  it('keeps OpenCV’s usual Farnebäck parameters as defaults', () => {
    // [M] calcOpticalFlowFarneback(prev, next, flow, 0.5, 3, 15, 3, 5, 1.2, 0), the call in OpenCV's samples.
    expect(resolveParams('farneback')).toEqual({
      pyrScale: 0.5,
      levels: 3,
      winSize: 15,
      iterations: 3,
      polyN: 5,
      polySigma: 1.2,
      gaussianWindow: false,
    });
  });

  it('merges overrides into the defaults', () => {
    expect(resolveParams('horn-schunck', { alpha: 3 }).alpha).toBe(3);
    expect(resolveParams('lucas-kanade', { iterations: 7 })).toMatchObject({ iterations: 7, levels: 3 });
  });

  it('refuses unknown and invalid parameters with a message', () => {
    expect(() => resolveParams('farneback', { winsize: 9 } as never)).toThrow(/unknown parameter "winsize"/);
    expect(() => resolveParams('farneback', { pyrScale: 1 })).toThrow(/pyrScale must be in \(0, 1\)/);
    expect(() => resolveParams('horn-schunck', { iterations: 2.5 })).toThrow(/iterations must be an integer/);
    expect(() => resolveParams('lucas-kanade', { windowSigma: Number.NaN })).toThrow(/windowSigma/);
  });

  it('returns the field with the estimator and the full parameters used', () => {
    const pair = makeMotionPair(64, 48, { kind: 'shift', dx: 1, dy: 0 }, 3);
    const field = estimateMotion('farneback', pair.prev, pair.next, 64, 48, { iterations: 2 });
    expect(field.estimator).toBe('farneback');
    expect(field.params).toEqual({ ...FARNEBACK_DEFAULTS, iterations: 2 });
    const direct = estimateFarneback(pair.prev, pair.next, 64, 48, field.params);
    expect(field.flow).toEqual(direct);
  });

  it('refuses frames whose length does not match the size', () => {
    const frame = new Float32Array(10);
    expect(() => estimateMotion('lucas-kanade', frame, frame, 4, 3)).toThrow(/need 12 values each/);
  });
});
