import fs from 'node:fs';
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { createMigrator, MIGRATION_NAMES } from '../migrator';
import { openPostgresDatabase, postgresLocation } from '../postgres-connection';
import { CopyRefused } from './copy-errors';
import { copyOrder } from './copy-order';
import { COPIES_TABLE, PostgresTarget, type RecordedCopy } from './postgres-target';
import { SqliteSource, type LiveWorker, type TableExtent } from './sqlite-source';

/** Tables the copy leaves alone: the migrations' own list, which the target keeps itself, and the copy's record. */
const NOT_COPIED = new Set(['schema_migrations', COPIES_TABLE]);

export type CopyEvent =
  | { kind: 'skipped'; table: string; rows: number }
  | { kind: 'started'; table: string; rows: number }
  | { kind: 'progress'; table: string; copied: number; rows: number }
  | { kind: 'copied'; table: string; rows: number };

export interface CopyTally {
  tables: number;
  copiedTables: number;
  copiedRows: number;
  skippedTables: number;
}

export interface DatabaseCopyOptions {
  /** The SQLite file of the installation (`<KINEFOLD_STORAGE_DIR>/db/kinefold.sqlite`). */
  sqliteFile: string;
  /** KINEFOLD_DATABASE_URL and KINEFOLD_DATABASE_CA. */
  databaseUrl: string;
  databaseCa: string | null;
  onEvent?: (event: CopyEvent) => void;
}

/**
 * Copies a SQLite installation's database into PostgreSQL (`npm run migrate:scale-out`): every table, ids kept,
 * values converted to PostgreSQL's column types, each table in one transaction with its line in the copy's record
 * (`scale_out_copies`), in an order that puts referenced tables first. Run again after an interruption, it skips
 * the tables already recorded and copies the rest; run again after it finished, it copies nothing.
 *
 * It refuses, before writing anything, when the SQLite file is missing, is no Kinefold database, or has a schema
 * other than this Kinefold's; when a worker may still be writing to it; when PostgreSQL holds Kinefold data that
 * this copy did not write (another installation, or a server already started on it), or holds a copy made from a
 * SQLite file that has changed since. Sessions are copied too, so people stay signed in.
 */
export async function copyDatabase(options: DatabaseCopyOptions): Promise<CopyTally> {
  const emit = options.onEvent ?? (() => undefined);
  const source = await openSource(options.sqliteFile);
  try {
    await checkSource(source);
    const tables = (await source.tables()).filter((table) => !NOT_COPIED.has(table));
    const extents = new Map<string, TableExtent>();
    for (const table of tables) extents.set(table, await source.extent(table));
    const sourceKey = await source.sourceKey();

    const sequelize = await openPostgresDatabase(options.databaseUrl, options.databaseCa);
    const where = `the PostgreSQL database at ${postgresLocation(options.databaseUrl)}`;
    try {
      const copied = await withConnection(sequelize, async (client) => {
        const target = new PostgresTarget(client);
        const recorded = await checkTarget(target, where, tables, extents, sourceKey, source.file);
        await createMigrator(sequelize).up();
        const order = copyOrder(tables, await target.references());
        await checkSchemasAgree(source, target, tables, where);
        const tally: CopyTally = { tables: order.length, copiedTables: 0, copiedRows: 0, skippedTables: 0 };
        for (const table of order) {
          const extent = extents.get(table)!;
          if (recorded.has(table)) {
            tally.skippedTables += 1;
            emit({ kind: 'skipped', table, rows: extent.rowCount });
            continue;
          }
          emit({ kind: 'started', table, rows: extent.rowCount });
          const rows = await target.copyTable(await target.describe(table), source, { sourceKey, ...extent }, (n) =>
            emit({ kind: 'progress', table, copied: n, rows: extent.rowCount }),
          );
          tally.copiedTables += 1;
          tally.copiedRows += rows;
          emit({ kind: 'copied', table, rows });
        }
        return tally;
      });
      await checkSourceUnchanged(source, tables, extents);
      return copied;
    } finally {
      await sequelize.close();
    }
  } finally {
    await source.close();
  }
}

async function openSource(file: string): Promise<SqliteSource> {
  if (!fs.existsSync(file)) {
    throw new CopyRefused(`KINEFOLD_STORAGE_DIR: there is no SQLite database at ${file} to copy. Nothing was changed.`);
  }
  try {
    return await SqliteSource.open(file);
  } catch (error) {
    throw new CopyRefused(`KINEFOLD_STORAGE_DIR: cannot read ${file}: ${(error as Error).message}`);
  }
}

/** The source is a Kinefold database with exactly this Kinefold's schema, and no worker may write to it. */
async function checkSource(source: SqliteSource): Promise<void> {
  const run = await source.migrationsRun();
  if (!run) throw new CopyRefused(`${source.file} is not a Kinefold database (no schema_migrations table).`);
  const unknown = run.filter((name) => !MIGRATION_NAMES.includes(name));
  if (unknown.length > 0) {
    throw new CopyRefused(
      `${source.file} was migrated by a newer Kinefold (${unknown.join(', ')}); run this command from that ` +
        'version. Nothing was changed.',
    );
  }
  const pending = MIGRATION_NAMES.filter((name) => !run.includes(name));
  if (pending.length > 0) {
    throw new CopyRefused(
      `${source.file} lacks migrations ${pending.join(', ')}: bring it up to date first with ` +
        '`npm run prepare-db` (KINEFOLD_DATABASE_URL unset), then run this again. Nothing was changed.',
    );
  }
  const live = await source.liveWorkers(new Date());
  if (live.length > 0) throw new CopyRefused(liveWorkerMessage(live));
}

function liveWorkerMessage(live: LiveWorker[]): string {
  const described = live.map((worker) => {
    const beat = worker.quietS === null ? 'no heartbeat' : `last heartbeat ${Math.round(worker.quietS)} s ago`;
    return `${worker.name} (${beat}, ${worker.jobsLeased} job${worker.jobsLeased === 1 ? '' : 's'} leased)`;
  });
  const lease = Math.max(...live.map((worker) => worker.leaseS ?? 0));
  return (
    `a Kinefold worker may still be writing to the SQLite database: ${described.join('; ')}. Stop the server and ` +
    'every worker, then run this again' +
    (lease > 0 ? ` (a worker that was killed counts as running until its ${lease} s lease has passed)` : '') +
    '. Nothing was changed.'
  );
}

/**
 * What PostgreSQL already holds may only be this copy's own earlier work: tables recorded as copied from this
 * installation, unchanged in the source since. Read before the target is migrated, so a database that is refused
 * is left exactly as it was. Returns the tables already copied.
 */
async function checkTarget(
  target: PostgresTarget,
  where: string,
  tables: string[],
  extents: Map<string, TableExtent>,
  sourceKey: string,
  sourceFile: string,
): Promise<Map<string, RecordedCopy>> {
  const run = await target.migrationsRun();
  const unknown = (run ?? []).filter((name) => !MIGRATION_NAMES.includes(name));
  if (unknown.length > 0) {
    throw new CopyRefused(
      `KINEFOLD_DATABASE_URL: ${where} was migrated by a newer Kinefold (${unknown.join(', ')}). Nothing was changed.`,
    );
  }
  const recorded = await target.recordedCopies();
  if ([...recorded.values()].some((copy) => copy.sourceKey !== sourceKey)) {
    throw new CopyRefused(
      `KINEFOLD_DATABASE_URL: ${where} holds a copy of another Kinefold installation, not of ${sourceFile}; ` +
        'copy into a new, empty database. Nothing was changed.',
    );
  }
  const present = new Set(await target.tables());
  const foreign: string[] = [];
  for (const table of tables) {
    if (!present.has(table) || recorded.has(table) || !(await target.hasRows(table))) continue;
    foreign.push(`${table}: ${await target.rowCount(table)} rows`);
  }
  if (foreign.length > 0) {
    throw new CopyRefused(
      `KINEFOLD_DATABASE_URL: ${where} already holds Kinefold data that this copy did not write ` +
        `(${foreign.join(', ')}): was a server, prepare-db or another installation started on it? Copy into a ` +
        'new, empty database. Nothing was changed.',
    );
  }
  for (const [table, copy] of recorded) {
    const now = extents.get(table);
    if (now && (now.rowCount !== copy.rowCount || now.lastRowid !== copy.lastRowid)) {
      throw new CopyRefused(
        `the SQLite database changed after its table ${table} was copied (${copy.rowCount} rows then, ` +
          `${now.rowCount} now): Kinefold ran on it in between. Stop Kinefold, then copy into a new, empty ` +
          'PostgreSQL database. Nothing was changed.',
      );
    }
  }
  return recorded;
}

/** Both databases hold the same tables with the same columns: the same migrations made them. */
async function checkSchemasAgree(
  source: SqliteSource,
  target: PostgresTarget,
  tables: string[],
  where: string,
): Promise<void> {
  const targetTables = (await target.tables()).filter((table) => !NOT_COPIED.has(table));
  const missing = tables.filter((table) => !targetTables.includes(table));
  const extra = targetTables.filter((table) => !tables.includes(table));
  if (missing.length > 0 || extra.length > 0) {
    throw new CopyRefused(
      `the tables of ${source.file} and ${where} differ (only in SQLite: ${missing.join(', ') || 'none'}; ` +
        `only in PostgreSQL: ${extra.join(', ') || 'none'}). Nothing was copied.`,
    );
  }
  for (const table of tables) {
    const sqlite = (await source.columns(table)).sort();
    const postgres = (await target.describe(table)).columns.map((column) => column.name).sort();
    if (sqlite.join() !== postgres.join()) {
      throw new CopyRefused(
        `the columns of ${table} differ between SQLite (${sqlite.join(', ')}) and PostgreSQL ` +
          `(${postgres.join(', ')}). Nothing was copied.`,
      );
    }
  }
}

/**
 * The copy read one state of the SQLite file; if a process wrote to it meanwhile, that write is not in PostgreSQL.
 * Said loudly (the next run refuses too, naming the table): the server or a worker was running.
 */
async function checkSourceUnchanged(
  source: SqliteSource,
  tables: string[],
  extents: Map<string, TableExtent>,
): Promise<void> {
  for (const table of tables) {
    const then = extents.get(table)!;
    const now = await source.extentNow(table);
    if (now.rowCount !== then.rowCount || now.lastRowid !== then.lastRowid) {
      throw new CopyRefused(
        `the SQLite database changed during the copy (${table}: ${then.rowCount} rows copied, ${now.rowCount} ` +
          'now): Kinefold was running. What was written meanwhile is not in PostgreSQL: stop the server and every ' +
          'worker, then copy into a new, empty PostgreSQL database.',
      );
    }
  }
}

/** One connection of Sequelize's pool, as the `pg` driver's client, for the copy's own transactions. */
async function withConnection<T>(sequelize: Sequelize, work: (client: pg.ClientBase) => Promise<T>): Promise<T> {
  const manager = sequelize.connectionManager;
  const client = (await manager.getConnection({ type: 'write' })) as pg.ClientBase;
  try {
    return await work(client);
  } finally {
    manager.releaseConnection(client);
  }
}
