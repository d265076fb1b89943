import { renewLease, type Lease } from '../../server/core/jobs/claim';

/**
 * Renews a job's lease every third of its length while the job runs, so two renewals can fail (a busy database)
 * before another worker may take the job. `onLost` is called when the job is gone or another worker holds it.
 */
export function startHeartbeat(lease: Lease, leaseMs: number, onLost: () => void): { stop(): void } {
  const timer = setInterval(() => {
    renewLease(lease, leaseMs).then(
      (held) => {
        if (!held) onLost();
      },
      (error: unknown) => console.warn(`Kinefold worker: lease of job ${lease.jobId} not renewed: ${error}`),
    );
  }, leaseMs / 3);
  return { stop: () => clearInterval(timer) };
}
