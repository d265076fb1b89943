import type { Transaction } from 'sequelize';
import type { JobKind, JobPayloads } from '../../shared/jobs';
import type { Config } from '../../server/core/config';
import type { Job } from '../../server/core/models';
import type { FramePool } from '../pool/frame-pool';
import type { WorkerStorage } from '../storage/worker-storage';
import type { Lease } from '../../server/core/jobs/claim';

/** What every handler gets besides its job: where things are (store, local paths, mirror), the pool, its lease. */
export interface JobContext extends WorkerStorage {
  config: Config;
  pool: FramePool;
  lease: Lease;
  /** Aborted when the worker stops or the lease is lost; handlers pass it on to ffmpeg and the pool. */
  signal: AbortSignal;
}

export interface ClaimedJob<K extends JobKind> {
  job: Job;
  payload: JobPayloads[K];
}

/** A failure as the handler records it where people see it. */
export interface JobFailure {
  message: string;
  /** True when retrying could not help (FinalJobError); false when the tries ran out. */
  final: boolean;
}

/**
 * One kind of job. `run` does the work (its stages commit as they go). `recordFailure` writes what people should
 * see when the job fails for good, inside the transaction that marks the job failed.
 */
export interface Handler<K extends JobKind> {
  run(claimed: ClaimedJob<K>, context: JobContext): Promise<void>;
  recordFailure(
    claimed: ClaimedJob<K>,
    failure: JobFailure,
    context: JobContext,
    transaction: Transaction,
  ): Promise<void>;
}

export type Handlers = { [K in JobKind]: Handler<K> };
