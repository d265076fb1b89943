/**
 * The cut detector's pair evidence in the worker-thread pool: a run of consecutive frames' thumbs in, the evidence
 * of each neighbour pair out. Each thread keeps one MotionWorkspace for the coarse fields, as motion-tasks.ts does.
 */
import { pairEvidence, type CutThumb, type PairEvidence } from '../signals/cut-evidence';
import { MotionWorkspace } from '../motion/workspace';

export interface CutPairsTask {
  kind: 'cut-pairs';
  /** Thumbs of consecutive frames: pairs (0, 1), (1, 2), … are measured. */
  thumbs: CutThumb[];
}

const workspace = new MotionWorkspace();

export function measureCutPairs({ thumbs }: CutPairsTask): PairEvidence[] {
  return thumbs.slice(1).map((next, k) => pairEvidence(thumbs[k]!, next, workspace));
}
