import { describe, expect, it } from 'vitest';
import {
  FARNEBACK_DEFAULTS,
  estimateFarneback,
  estimateFromExpansions,
  expandFrame,
} from '../../../worker/motion/farneback/farneback.js';
import { ESTIMATOR_REGISTRY } from '../../../worker/motion/index.js';
import type { EstimatorName } from '../../../shared/estimators';
import { MotionWorkspace } from '../../../worker/motion/kernels/workspace.js';
import { makeMotionPair } from '../../helpers/motion-pairs.js';
import { sameBits } from './field-difference.js';

// Reusing a workspace must not change results: buffers keep stale data from earlier, larger pairs, and every
// estimator has to overwrite what it reads. Bit-identical output is the project's requirement for a field
// computed in any thread of the pool.

const large = makeMotionPair(200, 150, { kind: 'rotate', degrees: 3 }, 11);
const small = makeMotionPair(120, 90, { kind: 'shift', dx: 1.25, dy: -0.75 }, 12);

describe.each(Object.keys(ESTIMATOR_REGISTRY) as EstimatorName[])('%s determinism', (name) => {
  const entry = ESTIMATOR_REGISTRY[name];
  const run = (pair: typeof small, workspace: MotionWorkspace): Float32Array =>
    entry.estimate(pair.prev, pair.next, pair.width, pair.height, entry.defaults as never, workspace);

  it('gives bit-identical fields with a fresh and with a reused workspace', () => {
    const fresh = run(small, new MotionWorkspace());
    const workspace = new MotionWorkspace();
    run(large, workspace);
    const afterLarge = run(small, workspace);
    const again = run(small, workspace);
    expect(sameBits(afterLarge, fresh)).toBe(true);
    expect(sameBits(again, fresh)).toBe(true);
  });

  it('stops growing its workspace once it has seen the largest frame', () => {
    const workspace = new MotionWorkspace();
    run(large, workspace);
    const grown = workspace.byteLength;
    run(small, workspace);
    run(large, workspace);
    expect(workspace.byteLength).toBe(grown);
  });
});

describe('farneback from shared expansions', () => {
  it('gives the same forward and backward fields as estimating each pair separately', () => {
    const { prev, next, width, height } = small;
    const workspace = new MotionWorkspace();
    const a = expandFrame(prev, width, height, FARNEBACK_DEFAULTS, workspace);
    const b = expandFrame(next, width, height, FARNEBACK_DEFAULTS, workspace);
    const forward = estimateFromExpansions(a, b, FARNEBACK_DEFAULTS, workspace);
    const backward = estimateFromExpansions(b, a, FARNEBACK_DEFAULTS, workspace);
    expect(sameBits(forward, estimateFarneback(prev, next, width, height))).toBe(true);
    expect(sameBits(backward, estimateFarneback(next, prev, width, height))).toBe(true);
  });

  it('refuses expansions made with other parameters', () => {
    const { prev, next, width, height } = small;
    const a = expandFrame(prev, width, height, FARNEBACK_DEFAULTS);
    const b = expandFrame(next, width, height, { ...FARNEBACK_DEFAULTS, polyN: 7, polySigma: 1.5 });
    expect(() => estimateFromExpansions(a, b)).toThrow(/do not match/);
  });
});
