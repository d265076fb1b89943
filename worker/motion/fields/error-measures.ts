// Accuracy of a motion field against ground truth: endpoint error (EPE) and angular error (AE).
// Sources: Baker et al., "A Database and Evaluation Methodology for Optical Flow", IJCV 92(1), 2011 (EPE and AE
// as evaluated there); Barron, Fleet, Beauchemin, "Performance of Optical Flow Techniques", IJCV 12(1), 1994
// (the angular error between space-time directions (u, v, 1)).

import { isUnknownFlow } from '../../../shared/motion/unknown-flow.js';

const DEGREES_PER_RADIAN = 180 / Math.PI;

/** EPE = √((u−u_gt)² + (v−v_gt)²), in pixels. */
export function endpointError(u: number, v: number, uTruth: number, vTruth: number): number {
  const du = u - uTruth;
  const dv = v - vTruth;
  return Math.sqrt(du * du + dv * dv);
}

/** AE = arccos((1 + u·u_gt + v·v_gt) / (√(1+u²+v²)·√(1+u_gt²+v_gt²))), in degrees. */
export function angularErrorDegrees(u: number, v: number, uTruth: number, vTruth: number): number {
  const lengths = Math.sqrt(1 + u * u + v * v) * Math.sqrt(1 + uTruth * uTruth + vTruth * vTruth);
  const cosine = (1 + u * uTruth + v * vTruth) / lengths;
  // Rounding can push the cosine of nearly equal vectors just past 1, where arccos is NaN.
  return Math.acos(Math.min(1, Math.max(-1, cosine))) * DEGREES_PER_RADIAN;
}

export interface AverageErrors {
  /** Average endpoint error (AEE), pixels. */
  aee: number;
  /** Average angular error, degrees. */
  aae: number;
  /** Pixels counted. */
  count: number;
}

export interface ErrorRegion {
  /** Pixels this close to the image edge are left out (an interior evaluation). */
  border?: number;
  /** Only pixels whose mask byte is non-zero count. */
  mask?: Uint8Array;
}

/**
 * Average EPE and AE of `flow` against `truth` (both interleaved u, v) over the region; pixels whose truth is
 * unknown are skipped. Throws when no pixel is left, since an average over nothing would read as perfect.
 */
export function averageErrors(
  flow: Float32Array,
  truth: Float32Array,
  width: number,
  height: number,
  region: ErrorRegion = {},
): AverageErrors {
  const pixels = width * height;
  if (flow.length !== 2 * pixels || truth.length !== 2 * pixels) {
    throw new Error(`error measures: fields must hold ${2 * pixels} values (${width}x${height})`);
  }
  const border = region.border ?? 0;
  const mask = region.mask;
  if (mask !== undefined && mask.length !== pixels) {
    throw new Error(`error measures: mask holds ${mask.length} bytes, ${pixels} needed`);
  }
  let epeSum = 0;
  let aeSum = 0;
  let count = 0;
  for (let y = border; y < height - border; y++) {
    for (let x = border; x < width - border; x++) {
      const p = y * width + x;
      if (mask !== undefined && mask[p] === 0) continue;
      const uTruth = truth[2 * p];
      const vTruth = truth[2 * p + 1];
      if (isUnknownFlow(uTruth, vTruth)) continue;
      epeSum += endpointError(flow[2 * p], flow[2 * p + 1], uTruth, vTruth);
      aeSum += angularErrorDegrees(flow[2 * p], flow[2 * p + 1], uTruth, vTruth);
      count++;
    }
  }
  if (count === 0) throw new Error('error measures: no pixel with known truth inside the region');
  return { aee: epeSum / count, aae: aeSum / count, count };
}
