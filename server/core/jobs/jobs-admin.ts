import { Op, type Order, type WhereOptions } from 'sequelize';
import type { ListPage } from '../../../shared/api-types';
import type { JobListQuery } from '../../../shared/schemas/admin';
import type { JobSummary } from '../../../shared/types/admin';
import { conflict, notFound } from '../errors';
import { Clip, Job, Pairset } from '../models';
import { recordAudit } from '../audit/audit';
import { reprocessClip } from '../clips/clip-media';

/** What a job works on, in words: its clip or pairset, else what its payload names. */
function targetOf(job: Job): string {
  const clip = job.get('clip') as Clip | null;
  if (job.clipId) return `clip ${job.clipId}${clip ? ` (${clip.originalName})` : ''}`;
  if (job.pairsetId) return `pairset ${job.pairsetId}`;
  const payload = job.payload as Partial<Record<'uploaderId' | 'projectId', number>>;
  if (job.kind === 'send-rejection-digest' && payload.uploaderId) return `uploader ${payload.uploaderId}`;
  if (job.kind === 'run-retention' && payload.projectId) return `project ${payload.projectId}`;
  return 'storage';
}

/** Seconds the latest attempt took, or has taken so far while it runs; null before it started. */
function durationOf(job: Job, now: Date): number | null {
  if (!job.startedAt) return null;
  const end = job.state === 'running' ? now : job.finishedAt;
  return end ? Math.max(0, (end.getTime() - job.startedAt.getTime()) / 1000) : null;
}

function toSummary(job: Job, now = new Date()): JobSummary {
  return {
    id: job.id,
    kind: job.kind,
    target: targetOf(job),
    clipId: job.clipId,
    state: job.state,
    attempts: job.attempts,
    leaseOwner: job.leaseOwner,
    leaseExpiresAt: job.leaseExpiresAt?.toISOString() ?? null,
    stage: job.stage,
    progress: job.progress,
    error: job.error,
    runAfter: job.runAfter.toISOString(),
    createdAt: job.createdAt.toISOString(),
    finishedAt: job.finishedAt?.toISOString() ?? null,
    startedAt: job.startedAt?.toISOString() ?? null,
    durationS: durationOf(job, now),
    worker: job.leaseOwner ?? job.lastWorker,
  };
}

export async function listJobs(query: JobListQuery): Promise<ListPage<JobSummary>> {
  const where: WhereOptions<Job> = {
    ...(query.state ? { state: query.state } : {}),
    ...(query.kind ? { kind: query.kind } : {}),
  };
  const order: Order = query.sort
    ? [
        [query.sort.replace(/^-/, ''), query.sort.startsWith('-') ? 'DESC' : 'ASC'],
        ['id', 'DESC'],
      ]
    : [['id', 'DESC']];
  const { rows, count } = await Job.findAndCountAll({
    where,
    order,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
    include: [{ model: Clip, as: 'clip', attributes: ['id', 'originalName'] }],
  });
  const now = new Date();
  return { items: rows.map((row) => toSummary(row, now)), total: count, page: query.page, pageSize: query.pageSize };
}

/**
 * Tries a failed or cancelled job again. A clip's processing goes through reprocessing (a fresh job, the clip
 * queued again); any other kind is queued again as it is, with its tries counted from zero.
 */
export async function retryJob(id: number, actorId: number): Promise<JobSummary> {
  const job = await Job.findByPk(id);
  if (!job) throw notFound(`Job ${id}`);
  if (job.state !== 'failed' && job.state !== 'cancelled') {
    throw conflict('job_not_retryable', `Job ${id} is ${job.state}; only failed or cancelled jobs can be tried again.`);
  }
  if (job.kind === 'process-clip' && job.clipId) {
    await reprocessClip(job.clipId, actorId);
    const fresh = await Job.findOne({ where: { clipId: job.clipId, kind: 'process-clip' }, order: [['id', 'DESC']] });
    return await reloadSummary(fresh!.id);
  }
  await Job.sequelize!.transaction(async (transaction) => {
    await job.update(
      {
        state: 'queued',
        attempts: 0,
        error: null,
        runAfter: new Date(),
        finishedAt: null,
        leaseOwner: null,
        leaseExpiresAt: null,
      },
      { transaction },
    );
    await recordAudit(
      { actorId, action: 'job.retry', targetType: 'job', targetId: id, detail: { kind: job.kind } },
      transaction,
    );
  });
  return reloadSummary(id);
}

/**
 * Cancels a queued or running job. A running job's worker loses its lease at the next heartbeat and stops; a
 * clip whose processing is cancelled is marked failed with that reason, so it never sits in `processing`.
 */
export async function cancelJob(id: number, actorId: number): Promise<JobSummary> {
  const job = await Job.findByPk(id);
  if (!job) throw notFound(`Job ${id}`);
  if (job.state !== 'queued' && job.state !== 'running') {
    throw conflict('job_not_cancellable', `Job ${id} is ${job.state}; only queued or running jobs can be cancelled.`);
  }
  await Job.sequelize!.transaction(async (transaction) => {
    const [changed] = await Job.update(
      {
        state: 'cancelled',
        leaseOwner: null,
        leaseExpiresAt: null,
        finishedAt: new Date(),
        error: 'Cancelled by an admin.',
      },
      { where: { id, state: { [Op.in]: ['queued', 'running'] } }, transaction },
    );
    if (changed === 0) throw conflict('job_not_cancellable', `Job ${id} finished meanwhile.`);
    if (job.kind === 'process-clip' && job.clipId) {
      await Clip.update(
        { state: 'failed', error: 'Processing was cancelled by an admin.' },
        { where: { id: job.clipId, state: { [Op.in]: ['queued', 'processing'] } }, transaction },
      );
    }
    if (job.kind === 'build-pairset' && job.pairsetId) {
      await Pairset.update({ state: 'cancelled' }, { where: { id: job.pairsetId, state: 'building' }, transaction });
    }
    await recordAudit(
      { actorId, action: 'job.cancel', targetType: 'job', targetId: id, detail: { kind: job.kind } },
      transaction,
    );
  });
  return reloadSummary(id);
}

async function reloadSummary(id: number): Promise<JobSummary> {
  const job = await Job.findByPk(id, { include: [{ model: Clip, as: 'clip', attributes: ['id', 'originalName'] }] });
  return toSummary(job!);
}
