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
}

const workspace = new MotionWorkspace();

/** Pair by pair, each pair's camera shift is the hint for the next one. */
export function measureCutPairs({ thumbs }: CutPairsTask): PairEvidence[] {
  const measured: PairEvidence[] = [];
  for (let k = 1; k < thumbs.length; k += 1) {
    measured.push(pairEvidence(thumbs[k - 1]!, thumbs[k]!, workspace, measured.at(-1)?.shift ?? null));
  }
  return measured;
}
