import { QueryTypes } from 'sequelize';
import type { RetentionPreview } from '../../../shared/types/admin';
import { conflict, notFound } from '../errors';
import { Job, Project } from '../models';
import { recordAudit } from '../audit/audit';
import { enqueueJob } from '../jobs/enqueue';

const DAY_MS = 24 * 3600_000;

/**
 * What retention would purge in a project now: rejected clips whose reject verdict in force is older than the
 * project's retention days and whose files are still there. Accepted clips never appear: only `rejected` counts.
 * The preview and the run use this same query, so the preview is exactly what the run deletes.
 */
export async function retentionCandidates(projectId: number, now = new Date()): Promise<RetentionPreview> {
  const project = await Project.findByPk(projectId);
  if (!project) throw notFound(`Project ${projectId}`);
  if (project.retentionDays === null || project.retentionDays === undefined) {
    return { projectId, retentionDays: null, clips: [], totalBytes: 0 };
  }
  const cutoff = new Date(now.getTime() - project.retentionDays * DAY_MS);
  const clips = await Project.sequelize!.query<{
    clipId: number;
    originalName: string;
    rejectedAt: string;
    bytes: number;
  }>(
    `SELECT c.id AS "clipId", c."originalName" AS "originalName", v.at AS "rejectedAt", c."storedBytes" AS bytes
     FROM clips c JOIN verdicts v ON v."clipId" = c.id AND v."supersededAt" IS NULL AND v.decision = 'reject'
     WHERE c."projectId" = :projectId AND c.state = 'rejected' AND c."purgedAt" IS NULL AND v.at <= :cutoff
     ORDER BY v.at, c.id`,
    {
      replacements: { projectId, cutoff: cutoff.toISOString().replace('T', ' ').replace('Z', ' +00:00') },
      type: QueryTypes.SELECT,
    },
  );
  const rows = clips.map((row) => ({
    ...row,
    bytes: Number(row.bytes),
    rejectedAt: new Date(row.rejectedAt).toISOString(),
  }));
  return {
    projectId,
    retentionDays: project.retentionDays,
    clips: rows,
    totalBytes: rows.reduce((sum, row) => sum + row.bytes, 0),
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
