import type { Transaction } from 'sequelize';
import { JOB_TARGETS, type JobKind, type JobPayloads } from '../../../shared/jobs';
import { Job } from '../models';

export interface EnqueueOptions {
  /** The transaction of the change that causes the job, so both land or neither does. */
  transaction: Transaction;
  /** Not before this time (default now). */
  runAfter?: Date;
}

/** The one place jobs are created: a queued job of `kind`, its payload checked against the kind at compile time. */
export function enqueueJob<K extends JobKind>(kind: K, payload: JobPayloads[K], options: EnqueueOptions): Promise<Job> {
  const targets = JOB_TARGETS[kind](payload);
  return Job.create(
    { kind, payload, ...targets, state: 'queued', runAfter: options.runAfter ?? new Date() },
    { transaction: options.transaction },
  );
}
