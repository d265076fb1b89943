/**
 * `npm run migrate:scale-out`: moves a SQLite + storage-folder installation to PostgreSQL and a bucket, each half
 * when its variable is set. The database half (KINEFOLD_DATABASE_URL) copies every table of
 * `<KINEFOLD_STORAGE_DIR>/db/kinefold.sqlite` into PostgreSQL (server/core/db/scale-out/); the store half
 * (KINEFOLD_OBJECT_STORE) copies the storage folder's clips and pairsets into the bucket. The database goes first:
 * its checks (no worker running, PostgreSQL empty or holding this copy) take seconds and refuse before hours of
 * uploading. Either half can be run again after an interruption: what is already copied is skipped.
 */
import { formatBytes } from '../../shared/format-bytes';
import { databasePath, loadConfig, type Config } from '../core/config';
import { postgresLocation, DatabaseStartupError } from '../core/db/postgres-connection';
import { copyDatabase, type CopyEvent } from '../core/db/scale-out/copy-database';
import { CopyRefused, TableCopyFailed } from '../core/db/scale-out/copy-errors';
import { copyIntoStore } from '../core/storage/copy-to-store';
import { createFolderStore } from '../core/storage/folder-store';
import { openStoreOrExit } from '../core/storage/open-store';

/** A progress line every this many objects. */
const REPORT_EVERY = 500;
/** A large table reports its progress about this many times, and at most every REPORT_ROWS_MIN rows. */
const REPORTS_PER_TABLE = 20;
const REPORT_ROWS_MIN = 10_000;

const say = (line: string) => console.log(`Kinefold migration: ${line}`);

/** One line on stderr and exit code 1: the message names what to fix; a stack trace would only hide it. */
function stop(message: string): never {
  console.error(`Kinefold migration: ${message}`);
  process.exit(1);
}

function readConfig(): Config {
  try {
    return loadConfig();
  } catch (error) {
    return stop((error as Error).message);
  }
}

async function copyDatabaseHalf(config: Config & { databaseUrl: string }): Promise<void> {
  const file = databasePath(config);
  say(`copying the database ${file} into PostgreSQL at ${postgresLocation(config.databaseUrl)}.`);
  let reported = 0;
  const onEvent = (event: CopyEvent) => {
    if (event.kind === 'started') reported = 0;
    const every = Math.max(REPORT_ROWS_MIN, Math.ceil(event.rows / REPORTS_PER_TABLE));
    if (event.kind === 'progress' && event.copied < event.rows && event.copied - reported >= every) {
      reported = event.copied;
      console.log(`  ${event.table}: ${event.copied} of ${event.rows} rows`);
    }
    if (event.kind === 'copied') console.log(`  ${event.table}: ${event.rows} rows copied`);
  };
  try {
    const tally = await copyDatabase({
      sqliteFile: file,
      databaseUrl: config.databaseUrl,
      databaseCa: config.databaseCa,
      onEvent,
    });
    say(
      tally.copiedTables === 0
        ? `database: nothing to copy, all ${tally.tables} tables were copied before.`
        : `database copied: ${tally.copiedTables} tables, ${tally.copiedRows} rows` +
            (tally.skippedTables > 0 ? `; ${tally.skippedTables} tables were copied before.` : '.'),
    );
  } catch (error) {
    if (error instanceof CopyRefused || error instanceof DatabaseStartupError) stop(error.message);
    if (error instanceof TableCopyFailed) {
      stop(
        `copying ${error.message}. Nothing of that table was kept, the tables copied before it were; ` +
          'correct the row in SQLite and run this again.',
      );
    }
    stop(`the database copy stopped: ${(error as Error).message}`);
  }
}

async function copyStoreHalf(config: Config): Promise<void> {
  const target = await openStoreOrExit(config, 'migration');
  const source = createFolderStore(config.storageDir);
  say(`copying ${source.location} into ${target.location}.`);
  const tally = await copyIntoStore(source, target, (key, sofar) => {
    if (sofar.copied % REPORT_EVERY === 0) console.log(`  ${sofar.copied} objects copied (last ${key})`);
  });
  say(`${tally.copied} objects copied (${formatBytes(tally.copiedBytes)}), ${tally.skipped} already in the store.`);
}

const config = readConfig();
if (!config.databaseUrl && !config.objectStore) {
  stop(
    'set KINEFOLD_DATABASE_URL (to copy the SQLite database into PostgreSQL), KINEFOLD_OBJECT_STORE (to copy ' +
      'the storage folder into a bucket), or both.',
  );
}
say('stop the Kinefold server and every worker until this is done; start them on the new settings afterwards.');
if (config.databaseUrl) await copyDatabaseHalf({ ...config, databaseUrl: config.databaseUrl });
if (config.objectStore) await copyStoreHalf(config);
