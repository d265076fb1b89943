import type { FlagThresholds } from '../../../shared/flag-thresholds';

/** Each flag threshold in plain words: what raises the flag, and the unit the number is in. */
export const THRESHOLD_WORDS: Record<keyof FlagThresholds, { label: string; unit: string }> = {
  darkMeanLuma: { label: 'Dark: mean brightness below', unit: 'grey level (0–255)' },
  overexposedMeanLuma: { label: 'Overexposed: mean brightness above', unit: 'grey level (0–255)' },
  overexposedClippedShare: { label: 'Overexposed: blown-out share above', unit: 'share of pixels (0–1)' },
  blurryLaplacianVariance: { label: 'Blurry: sharpness below', unit: 'Laplacian variance' },
  shortDurationS: { label: 'Short: length below', unit: 'seconds' },
  shortFrames: { label: 'Short: sampled frames fewer than', unit: 'frames' },
  cutHeavyPerMinute: { label: 'Cut-heavy: cuts more than', unit: 'per minute' },
  duplicateShare: { label: 'Duplicate: matching frames above', unit: 'share of frames (0–1)' },
  duplicateHashDistance: { label: 'Duplicate: frames match within', unit: 'bits of 64 differing' },
  staticMeanMagnitude: { label: 'Static: mean motion below', unit: 'px per frame step' },
  shakyJitter: { label: 'Shaky: camera jitter above', unit: 'px per frame step' },
};
