/** Starts the Kinefold server: opens the database, serves the API and the built client, stops cleanly on signals. */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApp } from './app';
import { loadConfig } from './core/config';
import { openKinefoldDatabaseOrExit } from './core/db/open';
import { runDemoCampaign } from './demo/campaign';
import { startMail } from './core/mail';
import { cleanStaleUploads, expireResumableUploads } from './core/usage/storage-hygiene';
import { objectKeys, storagePaths } from './core/storage/paths';
import { openStoreOrExit } from './core/storage/open-store';

/** How often idle resumable uploads are looked for; their expiry is measured in hours. */
const RESUMABLE_SWEEP_MS = 15 * 60_000;

const config = loadConfig();
const store = await openStoreOrExit(config, 'server');
const sequelize = await openKinefoldDatabaseOrExit(config);
const clientDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', 'dist');
const kinefold = createApp({ config, sequelize, clientDir, store });
// Only the server receives uploads, one server per storage folder, and it has not listened yet: nothing begun
// before this moment can still be in flight, so a crash mid-upload holds no quota past the restart.
// Resumable uploads are the exception: they wait for their sender until idle for config.resumableIdleMs.
const paths = storagePaths(config.storageDir);
const cleaned = await cleanStaleUploads(paths, { before: Date.now() });
// In a bucket, incoming/ holds only uploads staged for admission (the local folder's files were counted above).
if (store.kind === 's3') await store.delete(objectKeys.incomingDir);
if (cleaned.files + cleaned.reservations > 0) {
  console.log(
    `Kinefold server: removed ${cleaned.files} stale partial uploads, released ${cleaned.reservations} reservations.`,
  );
}
async function expireIdleUploads(): Promise<void> {
  const { uploads } = await expireResumableUploads(paths, { idleMs: config.resumableIdleMs });
  if (uploads > 0) console.log(`Kinefold server: ${uploads} resumable uploads idle too long removed, quota released.`);
}
await expireIdleUploads();
const expirySweep = setInterval(
  () => void expireIdleUploads().catch((error: unknown) => console.error('Kinefold server: upload expiry', error)),
  RESUMABLE_SWEEP_MS,
);

const mail = await startMail(config);
console.log(
  mail.fakeSmtp
    ? `Kinefold mail: no SMTP_URL, so a local fake SMTP server on ${mail.fakeSmtp.host}:${mail.fakeSmtp.port} keeps ` +
        'every message for the mail log.'
    : 'Kinefold mail: sending through SMTP_URL.',
);

const demoStop = new AbortController();
const server = kinefold.app.listen(config.port, () => {
  console.log(`Kinefold server listening on http://localhost:${config.port} (storage: ${store.location})`);
  // The demo footage is rendered by ffmpeg child processes, so the server answers requests meanwhile.
  if (config.demo === 'full') {
    runDemoCampaign(config, demoStop.signal).catch((error: unknown) =>
      console.error('Kinefold demo: seeding stopped', error),
    );
  }
});

let stopping = false;
function stop(signal: string): void {
  if (stopping) return;
  stopping = true;
  console.log(`Kinefold server: ${signal} received, closing.`);
  demoStop.abort();
  clearInterval(expirySweep);
  kinefold.close();
  server.close(() => {
    // A message in flight finishes before the database closes; anything not yet sent waits in the outbox.
    mail.stop().finally(() => sequelize.close().finally(() => process.exit(0)));
  });
  server.closeIdleConnections();
  // Long downloads must not hold the process forever.
  setTimeout(() => process.exit(0), 5_000).unref();
}
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));
