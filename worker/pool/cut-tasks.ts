/**
 * The cut detector's pair evidence in the worker-thread pool: a run of consecutive frames' thumbs in, the evidence
 * of each neighbour pair out. Each thread keeps one MotionWorkspace for the coarse fields, as motion-tasks.ts does.
 */
import { pairEvidence, type CutThumb, type PairEvidence } from '../signals/cut-evidence';
import { MotionWorkspace } from '../motion/kernels/workspace';

export interface CutPairsTask {
  kind: 'cut-pairs';
  /** Thumbs of consecutive frames: pairs (0, 1), (1, 2), … are measured. */
  thumbs: CutThumb[];
  /** The histogram distance of each of those pairs, which lets a quiet pair skip its fields (cut-evidence.ts). */
  histogramDistances: number[];
}

const workspace = new MotionWorkspace();

/** Pair by pair, each pair's camera shift is the hint for the next one. */
export function measureCutPairs({ thumbs, histogramDistances }: CutPairsTask): PairEvidence[] {
  if (histogramDistances.length !== thumbs.length - 1) {
    throw new RangeError(`${thumbs.length} thumbs need ${thumbs.length - 1} histogram distances`);
  }
  const measured: PairEvidence[] = [];
  for (let k = 1; k < thumbs.length; k += 1) {
    measured.push(
      pairEvidence(thumbs[k - 1]!, thumbs[k]!, workspace, measured.at(-1)?.shift ?? null, histogramDistances[k - 1]!),
    );
  }
  return measured;
}
