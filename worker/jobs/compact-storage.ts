import { Op } from 'sequelize';
import { Clip, Job } from '../../server/core/models';
import { enterJobStage, finishJob, reportJobProgress, type Lease } from '../../server/core/jobs/claim';
import { clipStoredUsage } from '../../server/core/storage/stored-usage';
import { removeOriginalFiles, writePackedFiles } from '../storage/compact-clip';
import type { Handler, JobContext } from './handler';
import { LeaseLostError } from './job-errors';

const CONVERTING = 'converting';
/** The job's stage while a switched clip's original files are removed: `removing:<clipId>`. */
const REMOVING = 'removing:';

/**
 * compact-storage: converts every clip still stored in the original format to the packed one, clip by clip, with
 * progress on the Jobs screen. For each clip: the packed files are written beside the originals
 * (storage/compact-clip.ts); one transaction switches the clip's format and records on the job which clip's
 * originals are to go; the originals are removed; a second transaction records the clip's new size. Killed
 * anywhere, nothing is lost: before the switch readers use the untouched originals and the next attempt writes
 * the packed files again; after it they use the packed files, and the next attempt first finishes the removal the
 * job row names. A clip with processing queued or running is left to processing, which stores it packed anyway.
 */
export const compactStorage: Handler<'compact-storage'> = {
  async run({ job }, context) {
    if (job.stage?.startsWith(REMOVING)) await finishRemoval(Number(job.stage.slice(REMOVING.length)), context);
    const total = await Clip.count({ where: { derivedFormat: 'original' } });
    let done = 0;
    let after = 0;
    for (;;) {
      // Between clips, so a stopping worker gives the job back at once instead of after the last clip; the next
      // claim carries on from the clips still in the original format.
      context.signal.throwIfAborted();
      const clip = await Clip.findOne({
        where: { derivedFormat: 'original', id: { [Op.gt]: after } },
        order: [['id', 'ASC']],
        attributes: ['id'],
      });
      if (!clip) break;
      after = clip.id;
      if (!(await beingProcessed(clip.id))) {
        await onLocalCopy(clip.id, context, () => writePackedFiles(context.paths, clip.id, context.signal));
        if (await switchFormat(clip.id, context.lease)) await finishRemoval(clip.id, context);
      }
      done += 1;
      await reportJobProgress(context.lease, CONVERTING, Math.min(1, done / Math.max(1, total)));
    }
    if (!(await finishJob(context.lease))) throw new LeaseLostError(context.lease.jobId);
  },
  async recordFailure() {
    // The job row keeps the error for the Jobs screen; the clips stay readable in whichever format they are in.
  },
};

async function beingProcessed(clipId: number): Promise<boolean> {
  const active = await Job.findOne({
    where: { clipId, kind: 'process-clip', state: { [Op.in]: ['queued', 'running'] } },
    attributes: ['id'],
  });
  return active !== null;
}

/** Switches the clip to the packed format unless processing took it meanwhile; false when it did not switch. */
async function switchFormat(clipId: number, lease: Lease): Promise<boolean> {
  return Clip.sequelize!.transaction(async (transaction) => {
    const active = await Job.findOne({
      where: { clipId, kind: 'process-clip', state: { [Op.in]: ['queued', 'running'] } },
      attributes: ['id'],
      transaction,
    });
    if (active) return false;
    const [switched] = await Clip.update(
      { derivedFormat: 'packed' },
      { where: { id: clipId, derivedFormat: 'original' }, transaction, silent: true },
    );
    if (!(await enterJobStage(lease, `${REMOVING}${clipId}`, transaction))) throw new LeaseLostError(lease.jobId);
    return switched === 1;
  });
}

/** Removes a switched clip's original files and records its size now; the job goes back to converting. */
async function finishRemoval(clipId: number, context: JobContext): Promise<void> {
  const { paths, store, lease } = context;
  await onLocalCopy(clipId, context, () => removeOriginalFiles(paths, clipId));
  const storedBytes = (await clipStoredUsage(store, clipId)).total;
  await Clip.sequelize!.transaction(async (transaction) => {
    await Clip.update({ storedBytes }, { where: { id: clipId }, transaction, silent: true });
    if (!(await enterJobStage(lease, CONVERTING, transaction))) throw new LeaseLostError(lease.jobId);
  });
}

/**
 * Runs `change` on the clip's files where the stages work on them and publishes the result: beside a bucket, on a
 * copy of the clip's derived files in the worker's scratch folder (worker/storage/clip-mirror.ts).
 */
async function onLocalCopy(clipId: number, { mirror }: JobContext, change: () => Promise<void>): Promise<void> {
  try {
    await mirror.pull(clipId, { source: false });
    await change();
    await mirror.push(clipId);
  } finally {
    await mirror.release(clipId);
  }
}
