import { describe, expect, it } from 'vitest';
import { clipReviewSignals, usablePairsByDelta } from '../../../shared/review/clip-signals';
import type { ClipFrame } from '../../../shared/types/frames';

const motion = (meanMagnitude: number, consistentShare: number) => ({
  meanMagnitude,
  p95Magnitude: 0,
  consistentShare,
});

function frame(index: number, cutBefore = false, field: ClipFrame['motion'] = null): ClipFrame {
  return {
    index,
    timeS: index / 5,
    meanLuma: 100,
    contrast: 0.2,
    sharpness: 150,
    clippedShare: 0,
    cutBefore,
    motion: field,
  };
}

// Six frames with a cut before frame 3; fields t→t+1 exist except across the cut (2→3) and past the end.
const frames = [
  frame(0, false, motion(1, 0.9)),
  frame(1, false, motion(3, 0.7)),
  frame(2),
  frame(3, true, motion(2, 0.8)),
  frame(4),
  frame(5),
];

describe('clip review signals', () => {
  it('counts frame~neighbour+Δ pairs that reach an existing frame without crossing a cut', () => {
    // By hand, with DESIGN §2's rule that no pair may span a cut (the moment rule of pairing-graph.ts):
    // Δ=1: t = 0, 1, 3, 4 (2→3 crosses the cut, 5 has no next frame) → 4.
    // Δ=2: t = 0 (0→2) and 3 (3→5); 1→3 and 2→4 cross the cut, 4→6 runs past the end → 2.
    expect(usablePairsByDelta(frames, [2, 1, 2])).toEqual([
      { delta: 1, pairs: 4 },
      { delta: 2, pairs: 2 },
    ]);
    expect(clipReviewSignals(frames, [1, 2]).usablePairs).toBe(6);
  });

  it('averages motion and consistency over the fields that exist', () => {
    // (1 + 3 + 2) / 3 = 2 px per step; (0.9 + 0.7 + 0.8) / 3 = 0.8.
    const signals = clipReviewSignals(frames, [1]);
    expect(signals.meanMotion).toBeCloseTo(2, 12);
    expect(signals.consistentShare).toBeCloseTo(0.8, 12);
  });

  it('leaves motion unavailable (null), not zero, when no field exists', () => {
    const still = frames.map((f) => ({ ...f, motion: null }));
    expect(clipReviewSignals(still, [1])).toEqual({ meanMotion: null, consistentShare: null, usablePairs: 4 });
  });
});
