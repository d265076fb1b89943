import type { Transaction } from 'sequelize';
import type { ClipState } from '../../shared/clip-states';
import { queueMail } from '../../server/core/mail/outbox';
import { Clip, User } from '../../server/core/models';
import { recordAudit } from '../../server/core/audit/audit';
import type { ClaimedJob, JobContext, JobFailure } from '../jobs/handler';

/**
 * A clip whose processing failed for good: it records the stage and a plain message, the audit trail says so, and
 * the uploader gets one e-mail, all in the transaction that marks the job failed. A clip with a verdict keeps it
 * (a failed reprocess does not undo a review); it only shows the error.
 */
export async function recordClipFailure(
  { job, payload }: ClaimedJob<'process-clip'>,
  failure: JobFailure,
  context: JobContext,
  transaction: Transaction,
): Promise<void> {
  const clip = await Clip.findByPk(payload.clipId, { transaction });
  if (!clip) return;
  const stage = clip.stage ?? 'sample';
  const error = failure.final
    ? failure.message
    : `Processing failed ${job.attempts} times in the ${stage} stage. The last error was: ${failure.message}`;
  await clip.update({ state: stateAfterFailure(clip.state), stage, error }, { transaction });
  await recordAudit(
    {
      actorId: null,
      action: 'clip.processing_failed',
      targetType: 'clip',
      targetId: clip.id,
      detail: { stage, message: error, jobId: job.id },
    },
    transaction,
  );
  const uploader = await User.findByPk(clip.uploaderId, { transaction });
  if (!uploader) return;
  await queueMail(
    {
      to: uploader.email,
      template: 'clip-failed',
      data: { name: uploader.name, clipId: clip.id, originalName: clip.originalName, stage, message: error },
    },
    { transaction, publicUrl: context.config.publicUrl },
  );
}

function stateAfterFailure(state: ClipState): ClipState {
  return state === 'accepted' || state === 'rejected' ? state : 'failed';
}
