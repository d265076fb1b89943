import { validMoments, type MomentFrame } from '../pairing/pairing-graph';

/**
 * Clip-level figures the review queue sorts and filters by, from a clip's frames (with their motion, where the
 * Motion stage measured it):
 * - meanMotion: mean over the clip's forward fields t→t+1 of the field's mean magnitude (px per frame step);
 * - consistentShare: mean over those fields of the share of pixels passing the forward–backward check;
 * - usablePairs: frame~neighbour+Δ pairs the clip can give, summed over the project's Δ: moments t where frame
 *   t+Δ exists and no cut lies before any of t+1…t+Δ (the pairing rule of shared/pairing/pairing-graph.ts).
 * Motion figures are null when no field exists (no Motion stage yet, or every step crosses a cut): unavailable,
 * never zero, so a clip without motion data never looks static.
 */
export interface ClipReviewSignals {
  meanMotion: number | null;
  consistentShare: number | null;
  usablePairs: number;
}

export interface DeltaPairs {
  delta: number;
  pairs: number;
}

export function clipReviewSignals(frames: readonly MomentFrame[], deltas: readonly number[]): ClipReviewSignals {
  const fields = frames.flatMap((frame) => (frame.motion ? [frame.motion] : []));
  const mean = (values: number[]) => (values.length === 0 ? null : values.reduce((a, b) => a + b, 0) / values.length);
  return {
    meanMotion: mean(fields.map((field) => field.meanMagnitude)),
    consistentShare: mean(fields.map((field) => field.consistentShare)),
    usablePairs: usablePairsByDelta(frames, deltas).reduce((sum, entry) => sum + entry.pairs, 0),
  };
}

/** frame~neighbour+Δ pairs per Δ (each Δ once, ascending). */
export function usablePairsByDelta(frames: readonly MomentFrame[], deltas: readonly number[]): DeltaPairs[] {
  return [...new Set(deltas)]
    .sort((a, b) => a - b)
    .map((delta) => ({
      delta,
      pairs: validMoments(frames, { kind: `frame~neighbour+${delta}`, a: 'frame', b: `neighbour+${delta}` }).length,
    }));
}
