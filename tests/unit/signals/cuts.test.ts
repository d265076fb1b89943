import { beforeAll, describe, expect, it } from 'vitest';
import { mulberry32 } from '../../../shared/pairing/seeded-random';
import {
  DEFAULT_CUT_BINS,
  DEFAULT_CUT_THRESHOLD,
  greyHistogram,
  histogramCorrelation,
} from '../../../worker/signals/cuts';
import { cutThumb, pairEvidence } from '../../../worker/signals/cut-evidence';
import { decideCuts, type PairMeasures } from '../../../worker/signals/cut-decision';
import { loadOpenCv, type OpenCv } from './opencv';
import { texturedGrey, withNoise } from './synthetic-frames';

const WIDTH = 64;
const HEIGHT = 48;

let cv: OpenCv;

beforeAll(async () => {
  ({ cv } = await loadOpenCv());
});

function compareHistWithOpenCv(h1: Float64Array, h2: Float64Array): number {
  const a = cv.matFromArray(h1.length, 1, cv.CV_32F, Array.from(h1));
  const b = cv.matFromArray(h2.length, 1, cv.CV_32F, Array.from(h2));
  const result = cv.compareHist(a, b, cv.HISTCMP_CORREL);
  a.delete();
  b.delete();
  return result;
}

describe('histogram correlation', () => {
  it('agrees with OpenCV compareHist(HISTCMP_CORREL)', () => {
    // PySceneDetect's HistogramDetector compares with cv2.compareHist(HISTCMP_CORREL) (CHECK-VALUES §9 [V]);
    // cross-checked here against OpenCV.js on random histograms.
    const random = mulberry32(3);
    for (let trial = 0; trial < 5; trial += 1) {
      const h1 = Float64Array.from({ length: DEFAULT_CUT_BINS }, () => Math.floor(random() * 500));
      const h2 = Float64Array.from({ length: DEFAULT_CUT_BINS }, () => Math.floor(random() * 500));
      expect(histogramCorrelation(h1, h2)).toBeCloseTo(compareHistWithOpenCv(h1, h2), 6);
    }
  });

  it('is 1 against a flat histogram, as OpenCV returns', () => {
    // OpenCV.js returns 1 when a histogram has no variance across bins (checked here, not assumed).
    const flat = new Float64Array(8).fill(4);
    const ramp = Float64Array.from({ length: 8 }, (_, i) => i);
    expect(compareHistWithOpenCv(flat, ramp)).toBe(1);
    expect(histogramCorrelation(flat, ramp)).toBe(1);
  });

  it('bins 8-bit grey into 128 equal bins over [0, 256)', () => {
    // cv2.calcHist(…, [128], [0, 256]) as PySceneDetect calls it: codes 0 and 1 share bin 0, 254 and 255 bin 127 [C].
    const h = greyHistogram(Float32Array.from([0, 1, 2, 254, 255, 255.4]));
    expect(h.length).toBe(128);
    expect([h[0], h[1], h[127]]).toEqual([2, 1, 3]);
  });
});

/** The detector on grey frames, as the signals stage runs it (worker/pipeline/cut-detection.ts). */
function decide(frames: Float32Array[]) {
  const thumbs = frames.map((grey) => cutThumb(grey, WIDTH, HEIGHT));
  const histograms = frames.map((grey) => greyHistogram(grey));
  const compare = (a: number, b: number): PairMeasures => ({
    ...pairEvidence(thumbs[a]!, thumbs[b]!),
    histogramDistance: 1 - histogramCorrelation(histograms[a]!, histograms[b]!),
  });
  const pairs = frames.slice(1).map((_, p) => compare(p, p + 1));
  return decideCuts(pairs, compare, { histogramThreshold: DEFAULT_CUT_THRESHOLD });
}

describe('cut detection', () => {
  it('defaults to PySceneDetect v0.7.2: 128 bins, threshold 0.20', () => {
    // PySceneDetect v0.7.2 release notes: threshold 0.05 → 0.20, bins 256 → 128 (CHECK-VALUES §9 [V]).
    expect(DEFAULT_CUT_BINS).toBe(128);
    expect(DEFAULT_CUT_THRESHOLD).toBe(0.2);
  });

  it('finds a scene switch exactly where it happens and nowhere else', () => {
    // Generated clip: frames 0..11 show a dim scene, frames 12..23 a bright one, each frame with its own noise.
    const switchAt = 12;
    const frames = Array.from({ length: 24 }, (_, i) => {
      const scene =
        i < switchAt
          ? texturedGrey(WIDTH, HEIGHT, 1, { mean: 70, amplitude: 40 })
          : texturedGrey(WIDTH, HEIGHT, 2, { mean: 170, amplitude: 50 });
      return withNoise(scene, 3, 100 + i);
    });
    const { cutBefore, evidence } = decide(frames);
    expect(cutBefore.map((c, i) => (c ? i : -1)).filter((i) => i >= 0)).toEqual([switchAt]);
    expect(evidence[switchAt]!.histogramDistance).toBeGreaterThan(DEFAULT_CUT_THRESHOLD);
    expect(evidence[switchAt]!.fired.histogram).toBeDefined();
  });

  it('finds no cut in a slow brightness ramp', () => {
    // Generated clip: the same scene brightening by 0.5 grey levels a frame over 60 frames (30 levels in all).
    const scene = texturedGrey(WIDTH, HEIGHT, 5, { mean: 100, amplitude: 60 });
    const frames = Array.from({ length: 60 }, (_, i) =>
      withNoise(
        scene.map((v) => v + i * 0.5),
        2,
        200 + i,
      ),
    );
    const { cutBefore, evidence } = decide(frames);
    expect(cutBefore.some(Boolean)).toBe(false);
    expect(Math.max(...evidence.slice(1).map((e) => e!.histogramDistance))).toBeLessThan(DEFAULT_CUT_THRESHOLD);
    // The ramp as a whole does move the histogram: first against last frame would read as a cut.
    expect(1 - histogramCorrelation(greyHistogram(frames[0]), greyHistogram(frames[59]))).toBeGreaterThan(0.2);
  });

  it('lets the histogram fire at ≥ the project threshold on 1 − correlation, as PySceneDetect compares', () => {
    // PySceneDetect cuts where correlation ≤ 1 − threshold, i.e. 1 − correlation ≥ threshold.
    const h1 = Float64Array.from([10, 0, 0, 10]);
    const h2 = Float64Array.from([10, 0, 10, 0]);
    const score = 1 - histogramCorrelation(h1, h2);
    const pairs = (distance: number): PairMeasures[] =>
      Array.from({ length: 9 }, (_, p) => ({
        histogramDistance: distance,
        edgeChange: 0,
        motionConsistency: 1,
        warpError: 0.1 + p * 1e-3,
      }));
    const compare = (): PairMeasures => ({ histogramDistance: 0, edgeChange: 0, motionConsistency: 1, warpError: 0 });
    // Every pair has the same distance, so only the project threshold, not the local level, can make it fire.
    expect(decideCuts(pairs(score), compare, { histogramThreshold: score }).evidence[5]!.fired.histogram).toBe(score);
    expect(
      decideCuts(pairs(score), compare, { histogramThreshold: score + 1e-9 }).evidence[5]!.fired.histogram,
    ).toBeUndefined();
  });
});
