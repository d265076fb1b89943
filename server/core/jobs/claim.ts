import { QueryTypes, type Transaction } from 'sequelize';
import { larger, pickForUpdate } from '../db/dialect';
import { Job } from '../models';

/**
 * Every statement that takes, keeps or lets go of a job's lease, in one module (DESIGN §10). Each statement matches
 * the lease owner, so a worker whose lease was taken over can no longer write to the job.
 */

export interface Lease {
  jobId: number;
  owner: string;
}

/**
 * Claims one job: the oldest due queued job, or a running one whose lease ran out (its worker died). One UPDATE …
 * RETURNING, so two workers never take the same job: atomic in SQLite, whose writers take turns; on PostgreSQL the
 * row is picked `FOR UPDATE SKIP LOCKED`, so a worker passes over a row another is claiming this instant instead
 * of waiting for it and then finding it taken. The claim counts as an attempt.
 */
export async function claimJob(owner: string, leaseMs: number, now = new Date()): Promise<Job | null> {
  const sequelize = Job.sequelize!;
  const rows = await sequelize.query<{ id: number }>(
    `UPDATE jobs SET state = 'running', "leaseOwner" = :owner, "leaseExpiresAt" = :expires, attempts = attempts + 1,
       "startedAt" = :now, "lastWorker" = :owner, "finishedAt" = NULL, "updatedAt" = :now
     WHERE id = (SELECT id FROM jobs
                 WHERE (state = 'queued' AND "runAfter" <= :now) OR (state = 'running' AND "leaseExpiresAt" < :now)
                 ORDER BY "runAfter", id LIMIT 1 ${pickForUpdate(sequelize)})
     RETURNING id`,
    { replacements: { owner, now, expires: new Date(now.getTime() + leaseMs) }, type: QueryTypes.SELECT },
  );
  const claimed = rows[0];
  return claimed ? Job.findByPk(claimed.id) : null;
}

/** Pushes the lease forward; false when the job is gone or another worker holds it now. */
export async function renewLease({ jobId, owner }: Lease, leaseMs: number): Promise<boolean> {
  const now = new Date();
  return update(
    `UPDATE jobs SET "leaseExpiresAt" = :expires, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, now, expires: new Date(now.getTime() + leaseMs) },
  );
}

/** Moves the job into `stage` with no progress yet; false when the lease is lost. */
export async function enterJobStage({ jobId, owner }: Lease, stage: string, transaction?: Transaction) {
  return update(
    `UPDATE jobs SET stage = :stage, progress = 0, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, stage, now: new Date() },
    transaction,
  );
}

/**
 * Progress (0..1) within `stage`. Matching the stage keeps a late progress write from dragging a job that has
 * moved on back to an earlier stage.
 */
export async function reportJobProgress({ jobId, owner }: Lease, stage: string, progress: number) {
  return update(
    `UPDATE jobs SET progress = :progress, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running' AND stage = :stage`,
    { jobId, owner, stage, progress, now: new Date() },
  );
}

/** Marks the job done; inside the caller's transaction when its last rows must land with it. */
export async function finishJob({ jobId, owner }: Lease, transaction?: Transaction): Promise<boolean> {
  return update(
    `UPDATE jobs SET state = 'done', progress = 1, error = NULL, "leaseOwner" = NULL, "leaseExpiresAt" = NULL,
       "finishedAt" = :now, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, now: new Date() },
    transaction,
  );
}

/** Marks the job cancelled: what it worked for was called off meanwhile (a pairset build cancelled or deleted). */
export async function cancelJob({ jobId, owner }: Lease): Promise<boolean> {
  return update(
    `UPDATE jobs SET state = 'cancelled', "leaseOwner" = NULL, "leaseExpiresAt" = NULL, "finishedAt" = :now, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, now: new Date() },
  );
}

/** Puts the job back in the queue after a failure that may go better later. */
export async function retryJob({ jobId, owner }: Lease, error: string, runAfter: Date): Promise<boolean> {
  return update(
    `UPDATE jobs SET state = 'queued', error = :error, "runAfter" = :runAfter, "leaseOwner" = NULL,
       "leaseExpiresAt" = NULL, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, error, runAfter, now: new Date() },
  );
}

/** Marks the job failed for good, in the transaction that records the failure where people see it. */
export async function failJob({ jobId, owner }: Lease, error: string, transaction: Transaction): Promise<boolean> {
  return update(
    `UPDATE jobs SET state = 'failed', error = :error, "leaseOwner" = NULL, "leaseExpiresAt" = NULL,
       "finishedAt" = :now, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, error, now: new Date() },
    transaction,
  );
}

/** Gives the job back untouched when the worker stops: due at once, and the interrupted try does not count. */
export async function releaseJob({ jobId, owner }: Lease): Promise<boolean> {
  return update(
    `UPDATE jobs SET state = 'queued', "runAfter" = :now, attempts = ${larger(Job.sequelize!, 'attempts - 1', '0')},
       "leaseOwner" = NULL, "leaseExpiresAt" = NULL, "updatedAt" = :now
     WHERE id = :jobId AND "leaseOwner" = :owner AND state = 'running'`,
    { jobId, owner, now: new Date() },
  );
}

/** Runs one UPDATE; true when it changed a row (BULKUPDATE makes Sequelize answer the changed-row count). */
async function update(sql: string, replacements: Record<string, unknown>, transaction?: Transaction) {
  const changes: unknown = await Job.sequelize!.query(sql, { replacements, transaction, type: QueryTypes.BULKUPDATE });
  return Number(changes) > 0;
}
