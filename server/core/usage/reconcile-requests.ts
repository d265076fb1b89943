import { Op, type Transaction } from 'sequelize';
import { Job } from '../models';
import { recordAudit } from '../audit/audit';
import { enqueueJob } from '../jobs/enqueue';

/**
 * Queues a reconcile-usage job unless one is already waiting or running, so a burst of requests (or the daily
 * schedule meeting an admin's click) costs one walk of the disk.
 */
export async function requestReconcile(reason: 'scheduled' | 'on-demand', actorId: number | null): Promise<Job> {
  return Job.sequelize!.transaction(async (transaction: Transaction) => {
    const pending = await Job.findOne({
      where: { kind: 'reconcile-usage', state: { [Op.in]: ['queued', 'running'] } },
      transaction,
    });
    if (pending) return pending;
    const job = await enqueueJob('reconcile-usage', { reason }, { transaction });
    if (actorId !== null) {
      await recordAudit(
        { actorId, action: 'usage.reconcile-request', targetType: 'job', targetId: job.id },
        transaction,
      );
    }
    return job;
  });
}
