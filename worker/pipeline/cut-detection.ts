import { CutMark } from '../../server/core/models';
import type { CutEvidence } from '../../shared/types/cuts';
import { splitRuns } from './motion-runs';
import type { FrameMeasurement } from '../pool/frame-tasks';
import { pairEvidence, type CutThumb } from '../signals/cut-evidence';
import { decideCuts, type CutDecision, type PairMeasures } from '../signals/cut-decision';
import { histogramCorrelation } from '../signals/cuts';
import { forEachFrame } from './each-frame';
import type { StageContext } from './stage';

export interface ClipCuts {
  /** What counts, per frame: a curator's mark where there is one, else the detector. */
  cutBefore: boolean[];
  /** The detector's evidence per frame (null for the first). */
  evidence: (CutEvidence | null)[];
  /** 1 − correlation of grey histograms with the previous frame (the frames' `cutScore`). */
  histogramDistances: (number | null)[];
}

/**
 * The cuts of a clip from its measured frames: the pair evidence runs in the thread pool in runs of consecutive
 * frames (one run per thread), the decision and its few checks across a transition or a flash in this thread, and
 * curators' marks override the detector frame by frame (so processing a clip again keeps them). Frames measured
 * without thumbs (the cost benchmark's reference runs, bench/cut-realtime.ts) are decided by the histogram
 * distance alone, as before the evidence existed.
 */
export async function detectClipCuts(
  clipId: number,
  measured: readonly FrameMeasurement[],
  histogramThreshold: number,
  context: Pick<StageContext, 'pool' | 'signal'>,
): Promise<ClipCuts> {
  const histogram = (a: number, b: number) => 1 - histogramCorrelation(measured[a]!.histogram, measured[b]!.histogram);
  const histogramDistances = measured.slice(1).map((_, p) => histogram(p, p + 1));
  const thumbs = measured.map((m) => m.cutThumb);
  const decision = thumbs.every((thumb): thumb is CutThumb => thumb !== null)
    ? await decideFromEvidence(thumbs, histogramDistances, histogram, histogramThreshold, context)
    : {
        cutBefore: measured.map((_, k) => k > 0 && histogramDistances[k - 1]! >= histogramThreshold),
        evidence: measured.map(() => null),
      };
  const marks = await CutMark.findAll({ where: { clipId }, attributes: ['frameIndex', 'value'] });
  const cutBefore = [...decision.cutBefore];
  for (const mark of marks) {
    if (mark.frameIndex > 0 && mark.frameIndex < cutBefore.length) cutBefore[mark.frameIndex] = mark.value === 'cut';
  }
  return {
    cutBefore,
    evidence: decision.evidence,
    histogramDistances: [null, ...histogramDistances],
  };
}

/** The detector's decision from the pair evidence, measured in the thread pool, and the histogram distances. */
async function decideFromEvidence(
  thumbs: CutThumb[],
  histogramDistances: number[],
  histogram: (a: number, b: number) => number,
  histogramThreshold: number,
  context: Pick<StageContext, 'pool' | 'signal'>,
): Promise<CutDecision> {
  const runs = thumbs.length > 1 ? splitRuns([{ first: 0, pairs: thumbs.length - 1 }], context.pool.threads) : [];
  const evidence = await forEachFrame(
    runs.length,
    { signal: context.signal, progress: () => undefined },
    (r, signal) => {
      const { first, pairs } = runs[r]!;
      return context.pool.measureCutPairs(
        {
          thumbs: thumbs.slice(first, first + pairs + 1),
          histogramDistances: histogramDistances.slice(first, first + pairs),
        },
        signal,
      );
    },
  );
  const pairs: PairMeasures[] = evidence
    .flat()
    .map((pair, p) => ({ ...pair, histogramDistance: histogramDistances[p]! }));
  const compare = (a: number, b: number): PairMeasures => ({
    ...pairEvidence(thumbs[a]!, thumbs[b]!),
    histogramDistance: histogram(a, b),
  });
  return decideCuts(pairs, compare, { histogramThreshold });
}
