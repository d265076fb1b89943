import { Op } from 'sequelize';
import type { WorkerPresenceState, WorkerSummary } from '../../../shared/types/admin';
import { WorkerPresence } from '../models';

/** How long a worker that stopped or went quiet stays listed, and its row kept. */
export const WORKER_LISTED_MS = 24 * 3600_000;

export interface WorkerIdentity {
  /** The name the worker writes on the leases it holds. */
  name: string;
  host: string;
  pid: number;
  version: string;
  /** Seconds of the worker's job leases (KINEFOLD_JOB_LEASE_S of its process). */
  leaseS: number;
}

/** A worker starting: its row, fresh; rows of workers long gone are cleared on the way. */
export async function announceWorker(worker: WorkerIdentity, now = new Date()): Promise<void> {
  await WorkerPresence.destroy({ where: { lastBeatAt: { [Op.lt]: new Date(now.getTime() - WORKER_LISTED_MS) } } });
  await WorkerPresence.upsert({ ...worker, jobsRunning: 0, startedAt: now, lastBeatAt: now, stoppedAt: null });
}

/** A heartbeat with the jobs the worker runs now; false when its row is gone (it is announced again then). */
export async function beatWorker(name: string, jobsRunning: number, now = new Date()): Promise<boolean> {
  const [changed] = await WorkerPresence.update({ jobsRunning, lastBeatAt: now, stoppedAt: null }, { where: { name } });
  return changed > 0;
}

/** A worker stopping cleanly: it holds no jobs any more. */
export async function retireWorker(name: string, now = new Date()): Promise<void> {
  await WorkerPresence.update({ jobsRunning: 0, lastBeatAt: now, stoppedAt: now }, { where: { name } });
}

/**
 * The workers heard from in the last day, most recent beat first. A worker is stale once a whole lease of its own
 * has passed without a beat: by then its job leases have run out too, and other workers take its jobs over.
 */
export async function listWorkers(now = new Date()): Promise<WorkerSummary[]> {
  const rows = await WorkerPresence.findAll({
    where: { lastBeatAt: { [Op.gte]: new Date(now.getTime() - WORKER_LISTED_MS) } },
    order: [
      ['lastBeatAt', 'DESC'],
      ['name', 'ASC'],
    ],
  });
  return rows.map((row) => ({
    name: row.name,
    host: row.host,
    pid: row.pid,
    version: row.version,
    leaseS: row.leaseS,
    jobsRunning: row.jobsRunning,
    startedAt: row.startedAt.toISOString(),
    lastBeatAt: row.lastBeatAt.toISOString(),
    state: presenceState(row, now),
  }));
}

function presenceState(row: WorkerPresence, now: Date): WorkerPresenceState {
  if (row.stoppedAt) return 'stopped';
  return now.getTime() - row.lastBeatAt.getTime() > row.leaseS * 1000 ? 'stale' : 'active';
}
