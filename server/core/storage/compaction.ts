import { Op } from 'sequelize';
import { enqueueJob } from '../jobs/enqueue';
import { Clip, Job } from '../models';

/**
 * Queues the compact-storage job when clips are still stored in the original format and no such job is waiting
 * or running; the worker calls it at start, so an upgraded installation converts its clips without being asked.
 * Returns whether a job was queued.
 */
export async function queueCompactionIfNeeded(reason: 'upgrade' | 'on-demand'): Promise<boolean> {
  return Clip.sequelize!.transaction(async (transaction) => {
    const original = await Clip.findOne({ where: { derivedFormat: 'original' }, attributes: ['id'], transaction });
    if (!original) return false;
    const active = await Job.findOne({
      where: { kind: 'compact-storage', state: { [Op.in]: ['queued', 'running'] } },
      attributes: ['id'],
      transaction,
    });
    if (active) return false;
    await enqueueJob('compact-storage', { reason }, { transaction });
    return true;
  });
}
