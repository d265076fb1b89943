import { describe, expect, it } from 'vitest';
import { clipMotionScale } from '../../shared/motion/motion-scale';

describe('the motion scale of a clip', () => {
  it('is the largest 95th-percentile magnitude among its forward fields, so one wild field edge cannot set it', () => {
    expect(clipMotionScale([{ p95Magnitude: 2.5 }, { p95Magnitude: 6 }, { p95Magnitude: 4 }])).toBe(6);
  });

  it('is null for a clip without fields and 0 for fields without motion', () => {
    expect(clipMotionScale([])).toBeNull();
    expect(clipMotionScale([{ p95Magnitude: 0 }])).toBe(0);
  });
});
