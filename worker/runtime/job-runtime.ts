import PQueue from 'p-queue';
import type { JobKind } from '../../shared/jobs';
import type { Config } from '../../server/core/config';
import type { Job } from '../../server/core/models';
import { claimJob, failJob, finishJob, releaseJob, retryJob, type Lease } from '../../server/core/jobs/claim';
import type { ClaimedJob, Handler, Handlers, JobContext } from '../jobs/handler';
import { HANDLERS } from '../jobs/handlers';
import { FinalJobError, LeaseLostError, ShutdownError } from '../jobs/job-errors';
import { RETRY_POLICIES, retryAt } from '../jobs/retry-policy';
import type { FramePool } from '../pool/frame-pool';
import type { WorkerStorage } from '../storage/worker-storage';
import { startHeartbeat } from './heartbeat';

export interface JobRuntimeOptions {
  config: Config;
  storage: WorkerStorage;
  pool: FramePool;
  /** This worker's name on the leases it holds. */
  owner: string;
  handlers?: Handlers;
  /** How long to wait before looking for due jobs again when none was due. */
  pollMs?: number;
}

export interface JobRuntime {
  /** Claims and runs jobs until stop() is called; resolves once the jobs in hand are settled. */
  run(): Promise<void>;
  /** Claims one due job and runs it to its end; false when none was due. */
  runOnce(): Promise<boolean>;
  /** Stops claiming, gives the jobs in hand back to the queue and waits until they are. */
  stop(): Promise<void>;
  /** The jobs in hand at this moment. */
  running(): number;
}

const DEFAULT_POLL_MS = 1000;

/**
 * The worker's job loop: claim a due job while a slot is free (p-queue limits how many run at once), run its
 * handler with a heartbeat on the lease, then settle it: done; queued again after a backoff; failed for good (at
 * once for a FinalJobError, or when out of tries); given back untouched on shutdown; or left alone when the
 * lease was lost (another worker has it, or it was deleted).
 */
export function createJobRuntime(options: JobRuntimeOptions): JobRuntime {
  const { config, storage, pool, owner, handlers = HANDLERS, pollMs = DEFAULT_POLL_MS } = options;
  const leaseMs = config.jobLeaseS * 1000;
  const queue = new PQueue({ concurrency: config.jobConcurrency });
  const inHand = new Set<AbortController>();
  let stopping = false;
  let wake: (() => void) | null = null;
  let looping: Promise<void> = Promise.resolve();

  async function runClaimed(job: Job): Promise<void> {
    const lease: Lease = { jobId: job.id, owner };
    const controller = new AbortController();
    inHand.add(controller);
    const heartbeat = startHeartbeat(lease, leaseMs, () => controller.abort(new LeaseLostError(job.id)));
    const context: JobContext = { config, ...storage, pool, lease, signal: controller.signal };
    const claimed = { job, payload: job.payload } as ClaimedJob<JobKind>;
    try {
      const policy = RETRY_POLICIES[job.kind];
      if (job.attempts > policy.maxClaims) {
        throw new FinalJobError(
          `The worker stopped ${job.attempts - 1} times while processing this; it is ` +
            'not tried again. An admin can start it again once the cause is found.',
        );
      }
      await handlerFor(handlers, job.kind).run(claimed, context);
      // A handler may have finished the job in its last transaction already; then this changes nothing.
      await finishJob(lease);
    } catch (error) {
      await settleFailure(claimed, context, error).catch((settleError: unknown) => {
        console.error(`Kinefold worker: job ${job.id} not settled; its lease will run out`, settleError);
      });
    } finally {
      heartbeat.stop();
      inHand.delete(controller);
    }
  }

  async function settleFailure(claimed: ClaimedJob<JobKind>, context: JobContext, error: unknown) {
    const { job } = claimed;
    const reason: unknown = context.signal.aborted ? context.signal.reason : error;
    if (reason instanceof LeaseLostError || error instanceof LeaseLostError) {
      console.warn(`Kinefold worker: ${(reason as Error).message}; leaving it`);
      return;
    }
    if (reason instanceof ShutdownError) {
      await releaseJob(context.lease);
      return;
    }
    const message = error instanceof Error ? error.message : String(error);
    const policy = RETRY_POLICIES[job.kind];
    const final = error instanceof FinalJobError;
    if (!final && job.attempts < policy.maxAttempts) {
      console.warn(`Kinefold worker: job ${job.id} (${job.kind}) failed on try ${job.attempts}; retrying`, error);
      await retryJob(context.lease, message, retryAt(policy, job.attempts));
      return;
    }
    if (!final) console.error(`Kinefold worker: job ${job.id} (${job.kind}) failed for good`, error);
    await job.sequelize.transaction(async (transaction) => {
      if (await failJob(context.lease, message, transaction)) {
        await handlerFor(handlers, job.kind).recordFailure(claimed, { message, final }, context, transaction);
      }
    });
  }

  async function runOnce(): Promise<boolean> {
    const job = await claimJob(owner, leaseMs);
    if (!job) return false;
    await runClaimed(job);
    return true;
  }

  async function loop(): Promise<void> {
    while (!stopping) {
      if (queue.pending + queue.size >= config.jobConcurrency) {
        await pause(pollMs);
        continue;
      }
      const job = await claimJob(owner, leaseMs).catch((error: unknown) => {
        console.error('Kinefold worker: could not look for jobs', error);
        return null;
      });
      if (job) void queue.add(() => runClaimed(job));
      else await pause(pollMs);
    }
    await queue.onIdle();
  }

  /** Waits `ms`, or less when a job finishes or the worker stops. */
  function pause(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const done = () => {
        clearTimeout(timer);
        queue.off('next', done);
        wake = null;
        resolve();
      };
      const timer = setTimeout(done, ms);
      queue.on('next', done);
      wake = done;
    });
  }

  return {
    run() {
      stopping = false;
      looping = loop();
      return looping;
    },
    runOnce,
    running: () => inHand.size,
    async stop() {
      stopping = true;
      for (const controller of inHand) controller.abort(new ShutdownError());
      wake?.();
      await looping;
      await queue.onIdle();
    },
  };
}

/**
 * The handler of a claimed job. The map is checked per kind at compile time; a row's kind and payload only meet
 * at run time, so the handler is widened to the union here, in one place.
 */
function handlerFor(handlers: Handlers, kind: JobKind): Handler<JobKind> {
  return handlers[kind] as unknown as Handler<JobKind>;
}
