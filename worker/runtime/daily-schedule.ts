import { Op } from 'sequelize';
import { Project, UsageSnapshot } from '../../server/core/models';
import { requestRetentionRun, retentionCandidates } from '../../server/core/clips/retention';
import { requestReconcile } from '../../server/core/usage/reconcile-requests';
import { utcDay } from '../jobs/reconcile-usage';

const CHECK_EVERY_MS = 10 * 60_000;
const REMEASURE_AFTER_MS = 6 * 3600_000;

/**
 * The worker's recurring work: once a day (UTC), when no usage snapshot exists yet for today, it queues the
 * retention purges that are due and a reconcile-usage job. Any worker may do this; neither request queues a
 * second job while one is waiting.
 */
export function startDailySchedule(): () => void {
  const check = async () => {
    try {
      const today = await UsageSnapshot.findOne({ where: { day: utcDay() }, attributes: ['id', 'takenAt'] });
      if (!today) {
        // Purges first, so the day's snapshot already counts the bytes they free.
        for (const project of await Project.findAll({ where: { retentionDays: { [Op.ne]: null } } })) {
          if ((await retentionCandidates(project.id)).clips.length > 0) await requestRetentionRun(project.id, null);
        }
        await requestReconcile('scheduled', null);
      } else if (Date.now() - today.takenAt.getTime() > REMEASURE_AFTER_MS) {
        // Today's figures are refreshed a few times a day, so the dashboard by kind never lags far behind.
        await requestReconcile('scheduled', null);
      }
    } catch (error) {
      console.error('Kinefold worker: could not check the daily schedule', error);
    }
  };
  void check();
  const timer = setInterval(check, CHECK_EVERY_MS);
  return () => clearInterval(timer);
}
