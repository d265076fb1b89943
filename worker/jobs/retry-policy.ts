import type { JobKind } from '../../shared/jobs';

/** How often a kind of job is tried and how long it waits between tries. */
export interface RetryPolicy {
  /** Tries (claims) after which a failing job is failed for good. */
  maxAttempts: number;
  /** Wait before the 2nd, 3rd, … try; the last entry repeats. */
  backoffS: readonly number[];
  /**
   * A job whose worker keeps dying under it (it is claimed again each time the lease runs out) is failed once
   * claimed this many times, so one poisonous file cannot keep the workers crashing forever.
   */
  maxClaims: number;
}

/** One table for every job kind; a kind without a policy does not compile. */
export const RETRY_POLICIES: { readonly [K in JobKind]: RetryPolicy } = {
  // Reading a clip fails for good at once (FinalJobError); what is left is the machine: a full disk, a busy
  // database. Those are worth a second and third try after a pause.
  'process-clip': { maxAttempts: 3, backoffS: [30, 120], maxClaims: 25 },
  // Measuring the disk only fails on a busy database or a vanished folder; the next try sees a settled tree.
  'reconcile-usage': { maxAttempts: 3, backoffS: [60, 600], maxClaims: 10 },
  // Purging is clip by clip, each committed on its own; a retry carries on with what is left.
  'run-retention': { maxAttempts: 3, backoffS: [60, 600], maxClaims: 10 },
  // A digest only writes rows (the outbox sends the mail), so a failure is a busy database: worth a few tries.
  'send-rejection-digest': { maxAttempts: 5, backoffS: [60, 300, 900], maxClaims: 10 },
  // A build starts over on each try; a definition that gives no pairs fails at once (FinalJobError), and a clip
  // reprocessed mid-build is worth one more try once its files are back.
  'build-pairset': { maxAttempts: 2, backoffS: [60], maxClaims: 5 },
  // Conversion is clip by clip, each switched on its own; a retry carries on with the clips left. Many claims are
  // allowed because a long conversion outlives worker restarts (upgrades, deployments).
  'compact-storage': { maxAttempts: 5, backoffS: [60, 600], maxClaims: 50 },
  // Clustering starts over on each try and fails for good on too few moments (FinalJobError); else a busy database.
  'cluster-moments': { maxAttempts: 2, backoffS: [60], maxClaims: 5 },
};

/** When a job that failed on its `attempts`-th try is due again. */
export function retryAt(policy: RetryPolicy, attempts: number, now = new Date()): Date {
  const waitS = policy.backoffS[Math.min(Math.max(attempts - 1, 0), policy.backoffS.length - 1)] ?? 0;
  return new Date(now.getTime() + waitS * 1000);
}
