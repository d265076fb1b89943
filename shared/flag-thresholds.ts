/**
 * Flag names and the thresholds that raise them, with their defaults. Projects may override any threshold.
 * A flag with a "below" threshold is raised when the measure is strictly below it; "above" when strictly above.
 * Signal scales: grey 0..255 at the working size; motion in px per sampled-frame step at the working size.
 *
 * Defaults and where they come from:
 * - blurryLaplacianVariance 100: "100 or less is regarded as blurry" for `cv2.Laplacian(gray).var()` on 8-bit
 *   grey (a Togaware guide, quoted in CHECK-VALUES §9 [V2]); the value depends on the footage and working size.
 * - duplicateHashDistance 5: dHash Hamming distances 0–5 are commonly read as "very similar", above 10 as
 *   "different" (common practice, after N. Krawetz's Hacker Factor posts [M]).
 * - Every other default is a Kinefold choice (common practice, no published source), to be tuned on real
 *   footage: darkMeanLuma 40, overexposedMeanLuma 215, overexposedClippedShare 0.10, shortDurationS 2,
 *   shortFrames 10, cutHeavyPerMinute 6, duplicateShare 0.5, staticMeanMagnitude 0.2, shakyJitter 2.
 */

export type FlagName = 'dark' | 'overexposed' | 'blurry' | 'static' | 'short' | 'cut-heavy' | 'shaky' | 'duplicate';

export const FLAG_NAMES: readonly FlagName[] = Object.freeze([
  'dark',
  'overexposed',
  'blurry',
  'static',
  'short',
  'cut-heavy',
  'shaky',
  'duplicate',
]);

export interface FlagThresholds {
  /** dark: median frame mean grey below this (0..255). */
  darkMeanLuma: number;
  /** overexposed: median frame mean grey above this (0..255)… */
  overexposedMeanLuma: number;
  /** …or median share of blown-highlight pixels (grey ≥ 253) above this (0..1). */
  overexposedClippedShare: number;
  /** blurry: median variance of the Laplacian below this (grey 0..255 at the working size). */
  blurryLaplacianVariance: number;
  /** short: duration below this many seconds… */
  shortDurationS: number;
  /** …or fewer sampled frames than this. */
  shortFrames: number;
  /** cut-heavy: detected cuts per minute of footage above this. */
  cutHeavyPerMinute: number;
  /** duplicate: share of frames with a near-identical frame in one other clip of the project above this (0..1). */
  duplicateShare: number;
  /** duplicate: largest dHash Hamming distance (of 64 bits) that counts as near-identical. */
  duplicateHashDistance: number;
  /** static: median over motion fields of the mean motion magnitude below this (px per step). */
  staticMeanMagnitude: number;
  /** shaky: median jitter of the global motion vector above this (px per step; see flags.ts). */
  shakyJitter: number;
}

export const DEFAULT_FLAG_THRESHOLDS: Readonly<FlagThresholds> = Object.freeze({
  darkMeanLuma: 40,
  overexposedMeanLuma: 215,
  overexposedClippedShare: 0.1,
  blurryLaplacianVariance: 100,
  shortDurationS: 2,
  shortFrames: 10,
  cutHeavyPerMinute: 6,
  duplicateShare: 0.5,
  duplicateHashDistance: 5,
  staticMeanMagnitude: 0.2,
  shakyJitter: 2,
});
