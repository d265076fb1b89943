import { describe, expect, it } from 'vitest';
import { DEFAULT_FLAG_THRESHOLDS, FLAG_NAMES } from '../../../shared/flag-thresholds';
import { flagNumber } from '../../../shared/review/flag-words';
import {
  clipFlags,
  type ClipFlagInput,
  type FlagFieldMotion,
  type FlagFrameSignals,
} from '../../../worker/signals/flags';
import { frameSignals } from '../../../worker/signals/frame-signals';
import { boxBlur, texturedGrey } from './synthetic-frames';

const WIDTH = 160;
const HEIGHT = 120;
const FPS = 5;

// Signal sets are made to sit well inside or outside each documented default (flag-thresholds.ts): each test
// names the default it crosses. The defaults themselves are Kinefold choices except blurry (Laplacian variance
// 100, CHECK-VALUES §9 [V2]) and the duplicate hash distance (common practice [M]).
function normalFrame(): FlagFrameSignals {
  return { meanLuma: 120, sharpness: 800, clippedHighShare: 0.01, cutBefore: false };
}

function normalMotion(t: number): FlagFieldMotion {
  // A steady pan: the global motion drifts by 0.1 px a step, far from shaky; everything moves, far from static.
  return { meanMagnitude: 3, medianU: 2 + 0.1 * t, medianV: 0.5 };
}

function normalClip(frameCount = 100): ClipFlagInput {
  return {
    durationS: frameCount / FPS,
    frames: Array.from({ length: frameCount }, normalFrame),
    motion: Array.from({ length: frameCount }, (_, t) => (t < frameCount - 1 ? normalMotion(t) : null)),
    duplicateShare: 0.05,
  };
}

function raisedNames(input: ClipFlagInput): string[] {
  return clipFlags(input).map((f) => f.flag);
}

function framesFrom(images: Float32Array[]): FlagFrameSignals[] {
  return images.map((grey) => ({ ...frameSignals(grey, WIDTH, HEIGHT), cutBefore: false }));
}

function clipOfImages(image: (i: number) => Float32Array): ClipFlagInput {
  const frames = framesFrom(Array.from({ length: 12 }, (_, i) => image(i)));
  return { ...normalClip(12), frames, motion: null, duplicateShare: null };
}

describe('clip flags', () => {
  it('raises nothing on a normal clip', () => {
    expect(clipFlags(normalClip())).toEqual([]);
  });

  it('raises nothing on normal generated footage', () => {
    const input = clipOfImages((i) => texturedGrey(WIDTH, HEIGHT, i + 1, { mean: 120, amplitude: 70 }));
    expect(raisedNames(input)).toEqual([]);
  });

  it('raises dark on generated dark footage (median mean luma below 40)', () => {
    const input = clipOfImages((i) => texturedGrey(WIDTH, HEIGHT, i + 1, { mean: 20, amplitude: 15 }));
    const [flag] = clipFlags(input);
    expect(flag.flag).toBe('dark');
    expect(flag.threshold).toBe(DEFAULT_FLAG_THRESHOLDS.darkMeanLuma);
    expect(flag.value).toBeLessThan(25);
    expect(flag.message).toMatch(/is \d+(\.\d+)?, under the limit of 40\.$/);
  });

  it('raises overexposed on generated blown-out footage (highlight share above 0.10)', () => {
    const input = clipOfImages((i) => texturedGrey(WIDTH, HEIGHT, i + 1, { mean: 240, amplitude: 60 }));
    const flag = clipFlags(input).find((f) => f.flag === 'overexposed');
    expect(flag?.measure).toBe('median share of blown highlights');
    expect(flag?.value).toBeGreaterThan(DEFAULT_FLAG_THRESHOLDS.overexposedClippedShare);
  });

  it('raises overexposed on bright footage without clipping (median mean luma above 215)', () => {
    const input = normalClip();
    input.frames = input.frames.map((f) => ({ ...f, meanLuma: 230, clippedHighShare: 0 }));
    expect(clipFlags(input).map((f) => [f.flag, f.measure])).toEqual([['overexposed', 'median mean luma (0–255)']]);
  });

  it('raises blurry on generated blurred footage (Laplacian variance below 100) and not on the sharp original', () => {
    const sharp = (i: number) => texturedGrey(WIDTH, HEIGHT, i + 1, { mean: 120, amplitude: 70 });
    expect(raisedNames(clipOfImages((i) => boxBlur(sharp(i), WIDTH, HEIGHT, 2, 3)))).toEqual(['blurry']);
    expect(raisedNames(clipOfImages(sharp))).not.toContain('blurry');
  });

  it('raises short on a clip under 2 s, and on one with fewer than 10 frames', () => {
    const brief = normalClip(8);
    expect(clipFlags(brief).map((f) => [f.flag, f.measure, f.value])).toEqual([['short', 'duration (s)', 1.6]]);
    const sparse = { ...normalClip(6), durationS: 30 };
    expect(clipFlags(sparse).map((f) => [f.flag, f.measure, f.value])).toEqual([['short', 'sampled frames', 6]]);
  });

  it('raises cut-heavy above 6 cuts a minute', () => {
    const input = normalClip(); // 20 s: cuts before frames 15, 45, 75 are 9 a minute [C]; 1 cut is 3
    input.frames = input.frames.map((f, i) => ({ ...f, cutBefore: i % 30 === 15 }));
    expect(clipFlags(input).map((f) => [f.flag, f.value])).toEqual([['cut-heavy', 9]]);
    input.frames = input.frames.map((f, i) => ({ ...f, cutBefore: i === 50 }));
    expect(clipFlags(input)).toEqual([]);
  });

  it('counts a fade or dissolve (cuts before several frames in a row) as one cut', () => {
    const input = normalClip(); // 20 s: three fades of 5 frames each are 9 transitions a minute [C], not 45
    input.frames = input.frames.map((f, i) => ({ ...f, cutBefore: i % 30 >= 15 && i % 30 < 20 }));
    expect(clipFlags(input).map((f) => [f.flag, f.value])).toEqual([['cut-heavy', 9]]);
  });

  it('raises duplicate above a 0.5 near-duplicate share, and never without another clip', () => {
    expect(raisedNames({ ...normalClip(), duplicateShare: 0.9 })).toEqual(['duplicate']);
    expect(raisedNames({ ...normalClip(), duplicateShare: null })).toEqual([]);
  });

  it('raises static below 0.2 px a step of median motion', () => {
    const input = normalClip();
    input.motion = input.motion!.map((m) => m && { ...m, meanMagnitude: 0.05, medianU: 0, medianV: 0 });
    expect(raisedNames(input)).toEqual(['static']);
  });

  it('raises shaky when the global motion jumps between steps (median jitter above 2 px), not on a pan', () => {
    const input = normalClip();
    // Hand-held shake: the median vector flips between (+3, −2) and (−3, +2), a jitter of √52 ≈ 7.2 px a step.
    input.motion = input.motion!.map((m, t) => m && { ...m, medianU: t % 2 ? 3 : -3, medianV: t % 2 ? -2 : 2 });
    const flags = clipFlags(input);
    expect(flags.map((f) => f.flag)).toEqual(['shaky']);
    expect(flags[0].value).toBeCloseTo(Math.sqrt(52), 12);
    // A fast but steady pan (12 px a step, no change) is not shaky.
    input.motion = input.motion!.map((m) => m && { ...m, meanMagnitude: 12, medianU: 12, medianV: 0 });
    expect(raisedNames(input)).toEqual([]);
  });

  it('skips static and shaky when no motion stage ran, and does not count across missing fields', () => {
    const still = normalClip();
    still.motion = null;
    expect(clipFlags(still)).toEqual([]);
    const cut = normalClip(4);
    cut.durationS = 60;
    cut.frames = [...cut.frames, ...Array.from({ length: 10 }, normalFrame)];
    // Fields on both sides of a missing one (a cut) are never compared: only the pairs 0–1 and 3–4 count.
    cut.motion = [normalMotion(0), normalMotion(1), null, { ...normalMotion(3), medianU: 50 }, normalMotion(4)];
    expect(raisedNames(cut)).toEqual(['shaky']);
  });

  it('returns value and threshold beside a readable message for every flag name in order', () => {
    const all: ClipFlagInput = {
      durationS: 1,
      frames: Array.from({ length: 5 }, (_, i) => ({
        meanLuma: 10,
        sharpness: 5,
        clippedHighShare: 0.5,
        cutBefore: i > 0,
      })),
      motion: [0, 1, 2, 3].map((t) => ({ meanMagnitude: 0.1, medianU: t % 2 ? 4 : -4, medianV: 0 })),
      duplicateShare: 1,
    };
    const flags = clipFlags(all);
    expect(flags.map((f) => f.flag)).toEqual([...FLAG_NAMES]);
    for (const f of flags) {
      // The value and the limit each appear once, in the units the curator reads (shares in per cent).
      const limit = flagNumber(f.measure, f.threshold);
      expect(f.message.split(`limit of ${limit}`)).toHaveLength(2);
      expect(f.message.split(` is ${flagNumber(f.measure, f.value)},`)).toHaveLength(2);
      expect(f.message).not.toContain('threshold');
      expect(Number.isFinite(f.value)).toBe(true);
    }
  });
});
