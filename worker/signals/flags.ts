/**
 * Flags of a clip from its signals. Each raised flag carries the measure, its value and the threshold that
 * raised it, so screens can show why. Flags advise; curators decide.
 *
 * Definitions (thresholds and their sources in flag-thresholds.ts):
 * - dark: median over frames of the mean grey < darkMeanLuma.
 * - overexposed: median share of blown-highlight pixels > overexposedClippedShare, else median mean grey >
 *   overexposedMeanLuma. Only highlights count: crushed shadows belong to dark footage.
 * - blurry: median variance of the Laplacian < blurryLaplacianVariance.
 * - short: duration < shortDurationS, else sampled frames < shortFrames.
 * - cut-heavy: cuts per minute > cutHeavyPerMinute (a run of frames with cuts before them, a fade, counts once).
 * - duplicate: best near-duplicate share with one other clip > duplicateShare.
 * - static: median over motion fields of the field's mean magnitude < staticMeanMagnitude.
 * - shaky: camera shake shows as a global motion that keeps changing between steps, while a pan keeps it
 *   steady. The global motion of a field is its median vector (median u, median v), robust to moving objects;
 *   the jitter at a step is the length of the change of that vector between consecutive fields t→t+1 and
 *   t+1→t+2 (never across a cut, where no field exists). Shaky when the median jitter > shakyJitter.
 * Medians make one odd frame (a flash, a lens cap) unable to raise or hide a flag alone.
 * static and shaky are skipped when no motion stage ran (motion null) or no field exists.
 */

import type { FlagName, FlagThresholds } from '../../shared/flag-thresholds';
import { DEFAULT_FLAG_THRESHOLDS, FLAG_NAMES } from '../../shared/flag-thresholds';
import { flagSentence } from '../../shared/review/flag-words';

const SECONDS_PER_MINUTE = 60;

export interface FlagFrameSignals {
  meanLuma: number;
  sharpness: number;
  clippedHighShare: number;
  cutBefore: boolean;
}

/** Summary of the motion field t→t+1 (px per step at the working size). */
export interface FlagFieldMotion {
  meanMagnitude: number;
  medianU: number;
  medianV: number;
}

export interface ClipFlagInput {
  durationS: number;
  frames: readonly FlagFrameSignals[];
  /** motion[t] is the field t→t+1, null where none exists (before a cut, at the end); null if no motion stage. */
  motion: readonly (FlagFieldMotion | null)[] | null;
  /** Best near-duplicate share with another clip of the project; null when there is no other clip. */
  duplicateShare: number | null;
}

export interface RaisedFlag {
  flag: FlagName;
  /** What was measured, in words a curator reads, e.g. "median mean luma (0–255)". */
  measure: string;
  value: number;
  threshold: number;
  message: string;
}

const MEASURES = {
  meanLuma: 'median mean luma (0–255)',
  clippedHigh: 'median share of blown highlights',
  sharpness: 'median variance of the Laplacian',
  motion: 'median mean motion (px per frame step)',
  duration: 'duration (s)',
  frames: 'sampled frames',
  cuts: 'cuts per minute',
  jitter: 'median jitter of the global motion (px per frame step)',
  duplicate: 'share of frames near-identical to another clip',
} as const;

type FlagCheck = (input: ClipFlagInput, thresholds: FlagThresholds) => RaisedFlag | null;

/** One check per flag name; a flag added to FlagName without a check does not compile. */
const CHECKS: { [F in FlagName]: FlagCheck } = {
  dark: (input, t) =>
    below('dark', MEASURES.meanLuma, medianOf(input, 'meanLuma'), t.darkMeanLuma, 'The footage is dark'),
  overexposed: (input, t) =>
    above(
      'overexposed',
      MEASURES.clippedHigh,
      medianOf(input, 'clippedHighShare'),
      t.overexposedClippedShare,
      'Too many pixels are blown to white',
    ) ??
    above(
      'overexposed',
      MEASURES.meanLuma,
      medianOf(input, 'meanLuma'),
      t.overexposedMeanLuma,
      'The footage is overexposed',
    ),
  blurry: (input, t) =>
    below(
      'blurry',
      MEASURES.sharpness,
      medianOf(input, 'sharpness'),
      t.blurryLaplacianVariance,
      'The footage is blurry',
    ),
  static: (input, t) =>
    below(
      'static',
      MEASURES.motion,
      median(presentFields(input).map((m) => m.meanMagnitude)),
      t.staticMeanMagnitude,
      'Almost nothing moves',
    ),
  short: (input, t) =>
    below('short', MEASURES.duration, input.durationS, t.shortDurationS, 'The clip is short') ??
    below('short', MEASURES.frames, input.frames.length, t.shortFrames, 'The clip has few frames'),
  'cut-heavy': (input, t) =>
    above('cut-heavy', MEASURES.cuts, cutsPerMinute(input), t.cutHeavyPerMinute, 'The clip has many scene cuts'),
  shaky: (input, t) =>
    above('shaky', MEASURES.jitter, median(globalMotionJitter(input.motion)), t.shakyJitter, 'The camera shakes'),
  duplicate: (input, t) =>
    above(
      'duplicate',
      MEASURES.duplicate,
      input.duplicateShare ?? Number.NaN,
      t.duplicateShare,
      `Frames match another clip within ${t.duplicateHashDistance} of 64 hash bits`,
    ),
};

/** All flags the signals raise, in the order of FLAG_NAMES. */
export function clipFlags(input: ClipFlagInput, thresholds: FlagThresholds = DEFAULT_FLAG_THRESHOLDS): RaisedFlag[] {
  return FLAG_NAMES.map((name) => CHECKS[name](input, thresholds)).filter((f): f is RaisedFlag => f !== null);
}

/** Length of the change of the median motion vector between consecutive fields (px per step). */
export function globalMotionJitter(motion: readonly (FlagFieldMotion | null)[] | null): number[] {
  const jitter: number[] = [];
  if (motion === null) return jitter;
  for (let t = 0; t + 1 < motion.length; t += 1) {
    const a = motion[t];
    const b = motion[t + 1];
    if (a && b) jitter.push(Math.hypot(b.medianU - a.medianU, b.medianV - a.medianV));
  }
  return jitter;
}

function presentFields(input: ClipFlagInput): FlagFieldMotion[] {
  return (input.motion ?? []).filter((m): m is FlagFieldMotion => m !== null);
}

function cutsPerMinute(input: ClipFlagInput): number {
  if (!(input.durationS > 0)) return Number.NaN;
  // A fade or dissolve puts a cut before each of its frames; it is one transition.
  const cuts = input.frames.filter((f, k) => f.cutBefore && !input.frames[k - 1]?.cutBefore).length;
  return (cuts * SECONDS_PER_MINUTE) / input.durationS;
}

/** NaN (nothing to measure) never raises a flag, since every comparison with NaN is false. */
function below(flag: FlagName, measure: string, value: number, threshold: number, lead: string): RaisedFlag | null {
  return value < threshold ? raised(flag, measure, value, threshold, lead) : null;
}

function above(flag: FlagName, measure: string, value: number, threshold: number, lead: string): RaisedFlag | null {
  return value > threshold ? raised(flag, measure, value, threshold, lead) : null;
}

function raised(flag: FlagName, measure: string, value: number, threshold: number, lead: string): RaisedFlag {
  return { flag, measure, value, threshold, message: flagSentence(lead, { measure, value, threshold }) };
}

function medianOf(input: ClipFlagInput, signal: Exclude<keyof FlagFrameSignals, 'cutBefore'>): number {
  return median(input.frames.map((f) => f[signal]));
}

function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((x, y) => x - y);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}
