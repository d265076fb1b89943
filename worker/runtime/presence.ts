import os from 'node:os';
import { announceWorker, beatWorker, retireWorker } from '../../server/core/jobs/worker-presence';
import { APP_VERSION } from '../../server/core/version';

export interface PresenceOptions {
  /** The worker's lease-owner name. */
  name: string;
  /** Seconds of its job leases. */
  leaseS: number;
  /** The jobs the worker runs at this moment. */
  jobsRunning: () => number;
}

/**
 * Announces this worker in the database and beats every third of a lease, as leases are renewed, so the Jobs screen
 * shows it stale only when its leases could have run out too. A failed beat is tried at the next one; a beat that
 * finds the row gone (cleared by hand) announces the worker again. `stop()` marks it stopped.
 */
export async function startPresence({
  name,
  leaseS,
  jobsRunning,
}: PresenceOptions): Promise<{ stop(): Promise<void> }> {
  const identity = { name, host: os.hostname(), pid: process.pid, version: APP_VERSION, leaseS };
  await announceWorker(identity);
  const beat = async () => {
    try {
      if (!(await beatWorker(name, jobsRunning()))) await announceWorker(identity);
    } catch (error) {
      console.warn(`Kinefold worker: heartbeat not recorded: ${error}`);
    }
  };
  const timer = setInterval(() => void beat(), (leaseS * 1000) / 3);
  return {
    async stop() {
      clearInterval(timer);
      await retireWorker(name);
    },
  };
}
