import { Clip } from '../../server/core/models';
import { recordAudit } from '../../server/core/audit/audit';
import { retentionCandidates } from '../../server/core/clips/retention';
import { objectKeys } from '../../server/core/storage/paths';
import type { Handler } from './handler';

/**
 * Purges the footage of rejected clips past their project's retention: each clip's stored files go (source and
 * everything derived), then one short transaction keeps the row and its verdict, sets `purgedAt`, releases the
 * bytes and writes an AuditEvent. Clip by clip, so a crash leaves the rest for the retry.
 */
export const runRetention: Handler<'run-retention'> = {
  async run({ payload }, { store, signal }) {
    const { clips } = await retentionCandidates(payload.projectId);
    for (const candidate of clips) {
      if (signal.aborted) throw signal.reason;
      await store.delete(objectKeys.clipDir(candidate.clipId));
      await Clip.sequelize!.transaction(async (transaction) => {
        const [changed] = await Clip.update(
          { purgedAt: new Date(), storedBytes: 0, hasPreview: false, hasThumbnail: false },
          { where: { id: candidate.clipId, state: 'rejected', purgedAt: null }, transaction },
        );
        if (changed === 0) return;
        await recordAudit(
          {
            actorId: null,
            action: 'clip.purge',
            targetType: 'clip',
            targetId: candidate.clipId,
            detail: { originalName: candidate.originalName, bytes: candidate.bytes, rejectedAt: candidate.rejectedAt },
          },
          transaction,
        );
      });
    }
  },
  async recordFailure() {
    // The job row keeps the error for the jobs screen; the clips not yet purged wait for the next run.
  },
};
