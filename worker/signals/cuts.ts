/**
 * Cut detection from grey histograms of neighbouring frames, as PySceneDetect's `HistogramDetector`
 * (`scenedetect/detectors/histogram_detector.py`, Breakthrough/PySceneDetect):
 * - histogram of the 8-bit grey (their Y of BGR→YUV, the same BT.601 luma as our grey) over [0, 256) in
 *   `bins` equal bins (`cv2.calcHist`);
 * - compared with `cv2.compareHist(…, HISTCMP_CORREL)`, the Pearson correlation of the bin counts;
 * - a cut before frame i when the correlation with frame i−1 is ≤ 1 − threshold, i.e. when our score
 *   1 − correlation is ≥ threshold. Defaults: 128 bins and threshold 0.20, the defaults since PySceneDetect
 *   v0.7.2 (release notes: threshold 0.05 → 0.20, bins 256 → 128, "calibrated from the benchmarks").
 * Kinefold uses this distance as one piece of evidence among several (cut-decision.ts): it fires at the project's
 * threshold, or lower where it stands out from the clip around it.
 * Differences: PySceneDetect also enforces a minimum scene length (15 frames by default); we do not, because our
 * frames are sampled sparsely (e.g. 5 a second) and a cut must be marked wherever it is, so that no pair spans it.
 * Their calibration was on full frame rate video; at our sample rate fast motion changes histograms more
 * between neighbours, which is why the threshold is a project setting.
 * Like every histogram method, this misses a cut between two shots with the same grey distribution.
 */

export const DEFAULT_CUT_BINS = 128;
export const DEFAULT_CUT_THRESHOLD = 0.2;

const GREY_LEVELS = 256;
const MAX_GREY_CODE = 255;
/** OpenCV's compareHist returns 1 when either histogram has no variance across bins; we keep that rule. */
const FLAT_HISTOGRAM_CORRELATION = 1;
const FLAT_EPSILON = Number.EPSILON;

/** Histogram of the rounded 8-bit grey codes of a frame (grey on 0..255). */
export function greyHistogram(grey: Float32Array, bins: number = DEFAULT_CUT_BINS): Float64Array {
  if (!Number.isInteger(bins) || bins < 1 || bins > GREY_LEVELS) {
    throw new RangeError(`bins must be an integer in 1..${GREY_LEVELS}, got ${bins}`);
  }
  const histogram = new Float64Array(bins);
  for (let p = 0; p < grey.length; p += 1) {
    const code = Math.min(MAX_GREY_CODE, Math.max(0, Math.round(grey[p])));
    histogram[Math.floor((code * bins) / GREY_LEVELS)] += 1;
  }
  return histogram;
}

/** Pearson correlation of two histograms, as `cv2.compareHist(h1, h2, HISTCMP_CORREL)`. */
export function histogramCorrelation(h1: Float64Array, h2: Float64Array): number {
  if (h1.length !== h2.length) {
    throw new RangeError(`histograms differ in length: ${h1.length} and ${h2.length}`);
  }
  const n = h1.length;
  let s1 = 0;
  let s2 = 0;
  for (let j = 0; j < n; j += 1) {
    s1 += h1[j];
    s2 += h2[j];
  }
  const mean1 = s1 / n;
  const mean2 = s2 / n;
  let cross = 0;
  let var1 = 0;
  let var2 = 0;
  for (let j = 0; j < n; j += 1) {
    const d1 = h1[j] - mean1;
    const d2 = h2[j] - mean2;
    cross += d1 * d2;
    var1 += d1 * d1;
    var2 += d2 * d2;
  }
  const denominator = var1 * var2;
  return Math.abs(denominator) > FLAT_EPSILON ? cross / Math.sqrt(denominator) : FLAT_HISTOGRAM_CORRELATION;
}
