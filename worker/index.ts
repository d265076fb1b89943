/**
 * The Kinefold worker process: opens the shared database and waits for jobs. The job runtime (claiming,
 * leases, stages) plugs in here; until then the worker only proves it can reach the database and stop cleanly.
 */
import { randomUUID } from 'node:crypto';
import os from 'node:os';
import { loadConfig } from '../server/config';
import { openKinefoldDatabase } from '../server/db/open';

const HEARTBEAT_MS = 30_000;

const config = loadConfig();
const workerId = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
const sequelize = await openKinefoldDatabase(config, { migrate: false });
console.log(`Kinefold worker ${workerId} ready (storage: ${config.storageDir}).`);

const heartbeat = setInterval(() => {
  sequelize.query('SELECT 1').catch((error: unknown) => console.error('Kinefold worker: database unreachable', error));
}, HEARTBEAT_MS);

function stop(signal: string): void {
  console.log(`Kinefold worker: ${signal} received, stopping.`);
  clearInterval(heartbeat);
  sequelize.close().finally(() => process.exit(0));
}
process.once('SIGINT', () => stop('SIGINT'));
process.once('SIGTERM', () => stop('SIGTERM'));
