/**
 * The Kinefold worker process (`npm run worker`): claims jobs from the shared database and runs them, with the
 * per-frame work in a worker-thread pool. SIGTERM or SIGINT: stop claiming, give the jobs in hand back to the
 * queue (their committed stages stay done), close and exit. A second signal exits at once.
 */
import { randomUUID } from 'node:crypto';
import os from 'node:os';
import { loadConfig } from '../server/core/config';
import { openKinefoldDatabaseOrExit } from '../server/core/db/open';
import { queueCompactionIfNeeded } from '../server/core/storage/compaction';
import { openStoreOrExit } from '../server/core/storage/open-store';
import { createFramePool } from './pool/frame-pool';
import { lowerCpuPriority } from './runtime/cpu-priority';
import { startDailySchedule } from './runtime/daily-schedule';
import { createJobRuntime } from './runtime/job-runtime';
import { startPresence } from './runtime/presence';
import { sweepScratch, workerStorage } from './storage/worker-storage';

const config = loadConfig();
lowerCpuPriority(config.workerNice);
const store = await openStoreOrExit(config, 'worker');
const storage = workerStorage(config, store);
// Beside a bucket the stages work on copies in this machine's scratch folder; a killed worker's copies go here.
if (store.kind !== 'folder') await sweepScratch(config.scratchDir);
const owner = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
const sequelize = await openKinefoldDatabaseOrExit(config, { migrate: false });
const pool = createFramePool();
const runtime = createJobRuntime({ config, storage, pool, owner });
const presence = await startPresence({ name: owner, leaseS: config.jobLeaseS, jobsRunning: runtime.running });
const stopSchedule = startDailySchedule();

let stopping = false;
function stop(signal: string): void {
  if (stopping) {
    console.log(`Kinefold worker: ${signal} again, exiting now.`);
    process.exit(1);
  }
  stopping = true;
  console.log(`Kinefold worker: ${signal} received, giving back the jobs in hand and stopping.`);
  stopSchedule();
  runtime
    .stop()
    .then(() => presence.stop())
    .then(() => pool.destroy())
    .then(() => sequelize.close())
    .then(
      () => process.exit(0),
      (error: unknown) => {
        console.error('Kinefold worker: stopped with an error', error);
        process.exit(1);
      },
    );
}
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));

// An installation upgraded from the original storage format converts its clips in the background.
if (await queueCompactionIfNeeded('upgrade')) console.log('Kinefold worker: queued compact-storage for older clips.');

// Ready once a signal stops it cleanly: before the handlers above, a SIGTERM would kill it outright.
const scratch = store.kind === 'folder' ? '' : `, scratch: ${storage.paths.root}`;
console.log(
  `Kinefold worker ${owner} ready (storage: ${store.location}${scratch}, ` +
    `database: ${config.databaseUrl ? 'PostgreSQL' : 'SQLite'}, lease ${config.jobLeaseS} s, ` +
    `${config.jobConcurrency} jobs at once, nice ${os.getPriority()}).`,
);

// A signal during the start-up steps above has stopped it already: running now would claim a job while it exits.
if (!stopping) await runtime.run();
