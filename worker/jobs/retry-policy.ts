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
};

/** When a job that failed on its `attempts`-th try is due again. */
export function retryAt(policy: RetryPolicy, attempts: number, now = new Date()): Date {
  const waitS = policy.backoffS[Math.min(Math.max(attempts - 1, 0), policy.backoffS.length - 1)] ?? 0;
  return new Date(now.getTime() + waitS * 1000);
}
