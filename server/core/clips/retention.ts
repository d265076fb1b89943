import { QueryTypes } from 'sequelize';
import type { RetentionPreview } from '../../../shared/types/admin';
import { conflict, notFound } from '../errors';
import { Job, Project } from '../models';
import { recordAudit } from '../audit/audit';
import { enqueueJob } from '../jobs/enqueue';

const DAY_MS = 24 * 3600_000;
/** How far ahead the preview looks: the windows the storage screen reports. */
export const RETENTION_LOOKAHEAD_DAYS = [7, 30] as const;

interface RejectedRow {
  clipId: number;
  originalName: string;
  rejectedAt: string;
  bytes: number;
}

/** Rejected, unpurged clips of a project whose reject verdict in force was given at or before `cutoff`. */
async function rejectedBy(projectId: number, cutoff: Date): Promise<RejectedRow[]> {
  const clips = await Project.sequelize!.query<RejectedRow>(
    `SELECT c.id AS "clipId", c."originalName" AS "originalName", v.at AS "rejectedAt", c."storedBytes" AS bytes
     FROM clips c JOIN verdicts v ON v."clipId" = c.id AND v."supersededAt" IS NULL AND v.decision = 'reject'
     WHERE c."projectId" = :projectId AND c.state = 'rejected' AND c."purgedAt" IS NULL AND v.at <= :cutoff
     ORDER BY v.at, c.id`,
    {
      replacements: { projectId, cutoff: cutoff.toISOString().replace('T', ' ').replace('Z', ' +00:00') },
      type: QueryTypes.SELECT,
    },
  );
  return clips.map((row) => ({ ...row, bytes: Number(row.bytes), rejectedAt: new Date(row.rejectedAt).toISOString() }));
}

/**
 * What retention would purge in a project now: rejected clips whose reject verdict in force is older than the
 * project's retention days and whose files are still there. Accepted clips never appear: only `rejected` counts.
 * The preview and the run use this same query, so the preview is exactly what the run deletes. `upcoming` lists
 * what comes due within the longest look-ahead window, with totals per window, should nothing change meanwhile.
 */
export async function retentionCandidates(projectId: number, now = new Date()): Promise<RetentionPreview> {
  const project = await Project.findByPk(projectId);
  if (!project) throw notFound(`Project ${projectId}`);
  if (project.retentionDays === null || project.retentionDays === undefined) {
    return { projectId, retentionDays: null, clips: [], totalBytes: 0, upcoming: [], windows: [] };
  }
  const keepMs = project.retentionDays * DAY_MS;
  const longest = Math.max(...RETENTION_LOOKAHEAD_DAYS);
  const within = await rejectedBy(projectId, new Date(now.getTime() + longest * DAY_MS - keepMs));
  const dueAt = (row: RejectedRow) => new Date(Date.parse(row.rejectedAt) + keepMs);
  const rows = within.filter((row) => dueAt(row) <= now);
  const upcoming = within
    .filter((row) => dueAt(row) > now)
    .map(({ clipId, originalName, bytes, ...row }) => ({
      clipId,
      originalName,
      bytes,
      dueAt: dueAt(row as RejectedRow),
    }));
  const windows = RETENTION_LOOKAHEAD_DAYS.map((days) => {
    const due = upcoming.filter((row) => row.dueAt.getTime() <= now.getTime() + days * DAY_MS);
    return { days, clips: due.length, bytes: due.reduce((sum, row) => sum + row.bytes, 0) };
  });
  return {
    projectId,
    retentionDays: project.retentionDays,
    clips: rows,
    totalBytes: rows.reduce((sum, row) => sum + row.bytes, 0),
    upcoming: upcoming.map((row) => ({ ...row, dueAt: row.dueAt.toISOString() })),
    windows,
  };
}

/** Queues the purge as a worker job (file deletion is never request work); one at a time per project. */
export async function requestRetentionRun(projectId: number, actorId: number | null): Promise<Job> {
  const project = await Project.findByPk(projectId);
  if (!project) throw notFound(`Project ${projectId}`);
  if (project.retentionDays === null) {
    throw conflict('retention_off', `Retention is off for project "${project.name}"; set its retention days first.`);
  }
  return Job.sequelize!.transaction(async (transaction) => {
    const pending = await Job.findOne({ where: { kind: 'run-retention', state: ['queued', 'running'] }, transaction });
    if (pending && (pending.payload as { projectId?: number }).projectId === projectId) return pending;
    const job = await enqueueJob('run-retention', { projectId }, { transaction });
    if (actorId !== null) {
      await recordAudit(
        { actorId, action: 'retention.request', targetType: 'project', targetId: projectId },
        transaction,
      );
    }
    return job;
  });
}
