import { recordAudit } from '../../server/core/audit/audit';
import { sendRejectionDigest } from '../../server/core/review/review-digest';
import type { Handler } from './handler';

/**
 * send-rejection-digest: the uploader's rejections since their last digest, in one message (review-digest.ts has
 * the design). The outbox row, the digest row and the listed verdicts commit together, so a retry never mails twice.
 */
export const sendRejectionDigestJob: Handler<'send-rejection-digest'> = {
  async run({ payload }, context) {
    await sendRejectionDigest(payload.uploaderId, context.config.publicUrl);
  },
  // The rejections stay unlisted, so the uploader's next rejection queues a digest that lists them too.
  async recordFailure({ job, payload }, failure, _context, transaction) {
    await recordAudit(
      {
        actorId: null,
        action: 'review.digest_failed',
        targetType: 'user',
        targetId: payload.uploaderId,
        detail: { jobId: job.id, message: failure.message },
      },
      transaction,
    );
  },
};
