/**
 * Per-frame signals from a grey image (0..255, working size; see shared/colour/grey.ts):
 * - meanLuma: mean grey value, 0..255.
 * - contrast: RMS contrast, the population standard deviation of the intensities scaled to 0..1
 *   (Peli, "Contrast in complex images", JOSA A 7(10), 1990 [M]); 0 for a flat frame, at most 0.5.
 * - sharpness: variance of the Laplacian (laplacian-variance.ts).
 * - clipped shares: share of pixels whose 8-bit value is ≤ 2 (crushed shadows) or ≥ 253 (blown highlights),
 *   counted on the rounded grey value. The 2/253 margins are common practice, not a published rule; they
 *   absorb the code values that compression noise leaves around pure black and white.
 */

import { laplacianVariance } from './laplacian-variance';

export const CLIPPED_LOW_MAX = 2;
export const CLIPPED_HIGH_MIN = 253;

const GREY_RANGE = 255;

export interface FrameSignals {
  meanLuma: number;
  contrast: number;
  sharpness: number;
  /** clippedLowShare + clippedHighShare, the value the frames API reports. */
  clippedShare: number;
  clippedLowShare: number;
  clippedHighShare: number;
}

export function frameSignals(grey: Float32Array, width: number, height: number): FrameSignals {
  const sharpness = laplacianVariance(grey, width, height);
  const count = grey.length;
  let sum = 0;
  let low = 0;
  let high = 0;
  for (let p = 0; p < count; p += 1) {
    sum += grey[p];
    const code = Math.round(grey[p]);
    if (code <= CLIPPED_LOW_MAX) low += 1;
    else if (code >= CLIPPED_HIGH_MIN) high += 1;
  }
  const meanLuma = sum / count;
  // A second pass over the deviations keeps a flat frame at exactly zero contrast.
  let squaredDeviations = 0;
  for (let p = 0; p < count; p += 1) {
    const d = grey[p] - meanLuma;
    squaredDeviations += d * d;
  }
  return {
    meanLuma,
    contrast: Math.sqrt(squaredDeviations / count) / GREY_RANGE,
    sharpness,
    clippedShare: (low + high) / count,
    clippedLowShare: low / count,
    clippedHighShare: high / count,
  };
}
