import { describe, expect, it } from 'vitest';
import {
  countPairs,
  pairKinds,
  validMoments,
  viewNames,
  type MomentFrame,
  type ViewName,
} from '../../../shared/pairing/pairing-graph';

function frames(count: number, cutsBefore: number[] = []): MomentFrame[] {
  return Array.from({ length: count }, (_, index) => ({ index, cutBefore: cutsBefore.includes(index) }));
}

describe('views per moment', () => {
  it('orders views frame, neighbours by Δ, luma, chroma, motion', () => {
    expect(viewNames(['motion', 'chroma', 'neighbour', 'luma', 'frame'], [2, 1, 2])).toEqual([
      'frame',
      'neighbour+1',
      'neighbour+2',
      'luma',
      'chroma',
      'motion',
    ]);
  });

  it('refuses a neighbour view without a valid Δ', () => {
    expect(() => viewNames(['frame', 'neighbour'], [])).toThrow(RangeError);
    expect(() => viewNames(['frame', 'neighbour'], [0])).toThrow(RangeError);
    expect(() => viewNames(['frame', 'neighbour'], [1.5])).toThrow(RangeError);
  });
});

describe('pairing graphs', () => {
  // Tian, Krishnan, Isola, "Contrastive Multiview Coding", 2019: the core view paradigm pairs the core view with
  // each other view (n − 1 pairs); the full graph pairs all views (n(n − 1)/2) [V2, as DESIGN §2 states it].
  const three: ViewName[] = ['frame', 'neighbour+2', 'motion'];
  const four: ViewName[] = ['frame', 'luma', 'chroma', 'motion'];

  it.each([
    [three, 2, 3],
    [four, 3, 6],
  ])('gives n − 1 core pairs and n(n − 1)/2 full pairs for %j', (views, core, full) => {
    expect(pairKinds(views, 'core')).toHaveLength(core);
    expect(pairKinds(views, 'full')).toHaveLength(full);
  });

  it('names pairs by their views', () => {
    expect(pairKinds(three, 'core').map((p) => p.kind)).toEqual(['frame~neighbour+2', 'frame~motion']);
    expect(pairKinds(four, 'full').map((p) => p.kind)).toEqual([
      'frame~luma',
      'frame~chroma',
      'frame~motion',
      'luma~chroma',
      'luma~motion',
      'chroma~motion',
    ]);
  });

  it('puts a chosen core view first and refuses one that was not chosen', () => {
    expect(pairKinds(four, 'core', 'luma').map((p) => p.kind)).toEqual(['luma~frame', 'luma~chroma', 'luma~motion']);
    expect(() => pairKinds(four, 'core', 'neighbour+1')).toThrow(RangeError);
  });

  it('falls back to the first view as core when frame is not chosen, and pairs nothing with one view', () => {
    expect(pairKinds(['luma', 'chroma'], 'core').map((p) => p.kind)).toEqual(['luma~chroma']);
    expect(pairKinds(['frame'], 'core')).toEqual([]);
    expect(pairKinds(['frame'], 'full')).toEqual([]);
  });
});

describe('valid moments', () => {
  const [frameNeighbour2, frameMotion, lumaChroma] = [
    { kind: 'frame~neighbour+2', a: 'frame', b: 'neighbour+2' },
    { kind: 'frame~motion', a: 'frame', b: 'motion' },
    { kind: 'luma~chroma', a: 'luma', b: 'chroma' },
  ] as const;

  it('never reaches past the end of the clip', () => {
    // 6 frames 0..5: neighbour+2 needs t+2 ≤ 5, motion needs t+1 ≤ 5, luma~chroma any t [C].
    expect(validMoments(frames(6), frameNeighbour2)).toEqual([0, 1, 2, 3]);
    expect(validMoments(frames(6), frameMotion)).toEqual([0, 1, 2, 3, 4]);
    expect(validMoments(frames(6), lumaChroma)).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('never spans a cut', () => {
    // A cut before frame 4 of 0..7: neighbour+2 from t needs no cut before t+1..t+2 [C].
    const clip = frames(8, [4]);
    expect(validMoments(clip, frameNeighbour2)).toEqual([0, 1, 4, 5]);
    expect(validMoments(clip, frameMotion)).toEqual([0, 1, 2, 4, 5, 6]);
    for (const t of validMoments(clip, frameNeighbour2)) expect(t < 4 && t + 2 >= 4).toBe(false);
  });

  it('treats a missing frame like a cut and accepts frames in any order', () => {
    const gappy = [5, 0, 1, 2, 4, 3].filter((i) => i !== 3).map((index) => ({ index, cutBefore: false }));
    expect(validMoments(gappy, frameMotion)).toEqual([0, 1, 4]);
  });

  it('applies motion filters to every pair of a moment and drops moments without a field', () => {
    const clip: MomentFrame[] = frames(5).map((f) => ({
      ...f,
      motion: f.index < 4 ? { meanMagnitude: f.index, consistentShare: f.index === 2 ? 0.2 : 0.9 } : null,
    }));
    expect(validMoments(clip, lumaChroma, { minMeanMotion: 1 })).toEqual([1, 2, 3]);
    expect(validMoments(clip, lumaChroma, { minMeanMotion: 1, minConsistentShare: 0.5 })).toEqual([1, 3]);
    expect(validMoments(clip, lumaChroma)).toEqual([0, 1, 2, 3, 4]);
  });

  it('counts pairs per kind over clips', () => {
    const pairs = pairKinds(['frame', 'neighbour+2', 'motion'], 'full');
    const counts = countPairs([frames(6), frames(8, [4])], pairs);
    expect(counts.map((c) => [c.kind, c.count])).toEqual([
      ['frame~neighbour+2', 4 + 4],
      ['frame~motion', 5 + 6],
      ['neighbour+2~motion', 4 + 4],
    ]);
  });
});
