// The generated frame pairs the estimator tests share: small and medium sub-pixel shifts, a rotation and a zoom
// at 160×120, and a larger shift at 320×180 where the pyramid has levels to work with.

import type { Warp } from '../../helpers/motion-pairs.js';

export interface MotionCase {
  name: string;
  width: number;
  height: number;
  warp: Warp;
}

export const MOTION_CASES: readonly MotionCase[] = [
  { name: 'shift (0.5, 0.25)', width: 160, height: 120, warp: { kind: 'shift', dx: 0.5, dy: 0.25 } },
  { name: 'shift (2.5, −1.5)', width: 160, height: 120, warp: { kind: 'shift', dx: 2.5, dy: -1.5 } },
  { name: 'rotation 2°', width: 160, height: 120, warp: { kind: 'rotate', degrees: 2 } },
  { name: 'zoom 1.03', width: 160, height: 120, warp: { kind: 'zoom', factor: 1.03 } },
  { name: 'shift (5.5, −3.25)', width: 320, height: 180, warp: { kind: 'shift', dx: 5.5, dy: -3.25 } },
];

/** Texture seed of the generated pairs. */
export const SEED = 7;

/** Interior evaluation: pixels this close to the edge are left out (motion there is partly out of view). */
export const BORDER = 16;
