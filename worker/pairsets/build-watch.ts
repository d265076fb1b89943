import { Pairset } from '../../server/core/models';
import { reportJobProgress, type Lease } from '../../server/core/jobs/claim';

/** The pairset stopped being built while we worked (cancelled or deleted); the build cleans up and stops. */
export class BuildStoppedError extends Error {
  constructor(pairsetId: number) {
    super(`the build of pairset ${pairsetId} was cancelled`);
    this.name = 'BuildStoppedError';
  }
}

export const BUILD_STAGE = 'build';
/** How often progress is written and the pairset's state looked at: often enough for a prompt cancel. */
const WATCH_INTERVAL_MS = 250;

/**
 * Progress and cancel for a build, called between pairs: at most every quarter second it reads the pairset's
 * state (a cancel or a delete stops the build with BuildStoppedError) and writes the share done to the pairset
 * and the job. A lost lease or a stopping worker aborts `signal`, which stops the build at the next call.
 */
export function watchBuild(pairsetId: number, lease: Lease, signal: AbortSignal) {
  let lastAt = 0;
  return async (share: number): Promise<void> => {
    signal.throwIfAborted();
    const now = Date.now();
    if (now - lastAt < WATCH_INTERVAL_MS) return;
    lastAt = now;
    const progress = Math.round(share * 1000) / 1000;
    const [updated] = await Pairset.update({ progress }, { where: { id: pairsetId, state: 'building' } });
    if (updated === 0) throw new BuildStoppedError(pairsetId);
    await reportJobProgress(lease, BUILD_STAGE, progress);
  };
}
