/**
 * The moment descriptor: what Kinefold already measures of a sampled moment, as one short vector for clustering.
 * Stored as two Float32 parts per moment (the signals stage writes appearance, the motion stage motion), one blob
 * per clip each; a clip's descriptor is the mean of its moments'.
 *
 * appearance (15): mean and standard deviation of CIE L*, a*, b* (D65); a magnitude-weighted histogram of gradient
 *   orientation in 8 bins over [0°, 180°) summing to 1 (0 for a flat frame); ln(1 + variance of the Laplacian).
 * motion (9): ln(1 + mean magnitude in px per step) of the field t → t+1; a magnitude-weighted histogram of its
 *   direction in 8 bins over [−180°, 180°) summing to 1. All 0 where the moment has no field (a cut, the clip's end).
 */
export const ORIENTATION_BINS = 8;
export const DIRECTION_BINS = 8;
export const APPEARANCE_DIMS = 6 + ORIENTATION_BINS + 1;
export const MOTION_DIMS = 1 + DIRECTION_BINS;
export const DESCRIPTOR_DIMS = APPEARANCE_DIMS + MOTION_DIMS;

/** One moment's full descriptor from its two stored parts (motion null: no field, zeros). */
export function momentDescriptor(
  appearance: ArrayLike<number>,
  motion: ArrayLike<number> | null,
  out: Float64Array = new Float64Array(DESCRIPTOR_DIMS),
): Float64Array {
  for (let j = 0; j < APPEARANCE_DIMS; j += 1) out[j] = appearance[j]!;
  for (let j = 0; j < MOTION_DIMS; j += 1) out[APPEARANCE_DIMS + j] = motion ? motion[j]! : 0;
  return out;
}
