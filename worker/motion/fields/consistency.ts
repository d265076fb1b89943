// Forward–backward consistency of a pair of motion fields: a pixel is consistent when following the forward field
// and then the backward field brings it (nearly) back where it started.
// Source: N. Sundaram, T. Brox, K. Keutzer, "Dense Point Trajectories by GPU-Accelerated Large Displacement
// Optical Flow", ECCV 2010 (their occlusion check; formula and constants from memory, as commonly quoted):
// |w_f(x) + w_b(x + w_f(x))|² < α(|w_f(x)|² + |w_b(x + w_f(x))|²) + β with α = 0.01 and β = 0.5 px².
// The tolerance grows with the motion because estimates of large motions are less precise. w_b is read
// bilinearly; a pixel whose forward motion leaves the frame has no backward motion to check against and counts
// as inconsistent (it is occluded by the frame edge).

import { isUnknownFlow } from '../../../shared/motion/unknown-flow.js';

export interface ConsistencyParams {
  /** Relative tolerance α (dimensionless). */
  alpha: number;
  /** Absolute tolerance β in pixels². */
  beta: number;
}

export const CONSISTENCY_DEFAULTS: Readonly<ConsistencyParams> = Object.freeze({ alpha: 0.01, beta: 0.5 });

export interface ConsistencyResult {
  /** One byte per pixel: 1 consistent, 0 not. */
  mask: Uint8Array;
  /** Consistent pixels / all pixels. */
  consistentShare: number;
}

/**
 * Checks `forward` (frame A → B) against `backward` (B → A), both interleaved (u, v) of width × height.
 * The mask goes to `out` when given.
 */
export function forwardBackwardConsistency(
  forward: Float32Array,
  backward: Float32Array,
  width: number,
  height: number,
  params: ConsistencyParams = CONSISTENCY_DEFAULTS,
  out?: Uint8Array,
): ConsistencyResult {
  const pixels = width * height;
  if (forward.length !== 2 * pixels || backward.length !== 2 * pixels) {
    throw new Error(`consistency: ${width}x${height} fields need ${2 * pixels} values each`);
  }
  const mask = out ?? new Uint8Array(pixels);
  if (mask.length !== pixels) throw new Error(`consistency: mask holds ${mask.length} bytes, ${pixels} needed`);
  const maxX = width - 1;
  const maxY = height - 1;
  let consistent = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      const uf = forward[2 * p];
      const vf = forward[2 * p + 1];
      const tx = x + uf;
      const ty = y + vf;
      // Negated so that NaN positions also fail.
      if (isUnknownFlow(uf, vf) || !(tx >= 0 && tx <= maxX && ty >= 0 && ty <= maxY)) {
        mask[p] = 0;
        continue;
      }
      const x0 = Math.floor(tx);
      const y0 = Math.floor(ty);
      const fx = tx - x0;
      const fy = ty - y0;
      const dx = x0 < maxX ? 2 : 0;
      const dy = y0 < maxY ? 2 * width : 0;
      const q = 2 * (y0 * width + x0);
      const ub = bilinear(backward, q, dx, dy, fx, fy);
      const vb = bilinear(backward, q + 1, dx, dy, fx, fy);
      const su = uf + ub;
      const sv = vf + vb;
      const loop = su * su + sv * sv;
      const tolerance = params.alpha * (uf * uf + vf * vf + ub * ub + vb * vb) + params.beta;
      const ok = loop < tolerance ? 1 : 0;
      mask[p] = ok;
      consistent += ok;
    }
  }
  return { mask, consistentShare: consistent / pixels };
}

function bilinear(field: Float32Array, q: number, dx: number, dy: number, fx: number, fy: number): number {
  const top = field[q] + fx * (field[q + dx] - field[q]);
  const bottom = field[q + dy] + fx * (field[q + dy + dx] - field[q + dy]);
  return top + fy * (bottom - top);
}
