import { randomBytes } from 'node:crypto';
import pg from 'pg';

/**
 * Where the PostgreSQL leg of the test matrix (vitest project `pg`) creates its databases: set by that project,
 * unset for the SQLite runs. The server must trust local connections of user postgres (`.ci/run` starts it).
 */
export const TEST_POSTGRES_URL = process.env.KINEFOLD_TEST_POSTGRES_URL ?? null;

export interface TestDatabase {
  /** KINEFOLD_DATABASE_URL for the test's processes; null means SQLite under the storage folder. */
  url: string | null;
  drop(): Promise<void>;
}

/**
 * A database of its own for one test file: on PostgreSQL a new `kf_<random>` database created from the test
 * server's maintenance database and dropped afterwards (closing whatever connections are left), so test files can
 * run side by side; on SQLite nothing to do, the file lives in the test's storage folder.
 */
export async function freshTestDatabase(): Promise<TestDatabase> {
  if (!TEST_POSTGRES_URL) return { url: null, drop: async () => undefined };
  return freshDatabaseOn(TEST_POSTGRES_URL);
}

/**
 * The PostgreSQL server the `pg` project uses, with the same default (vite.config.ts), for a test of the `node`
 * project that needs PostgreSQL beside SQLite (moving an installation from one to the other).
 */
const POSTGRES_SERVER_URL = TEST_POSTGRES_URL ?? 'postgres://postgres@127.0.0.1:5432/test';

/** A new, empty PostgreSQL database of its own, whichever project runs the test. */
export function freshPostgresDatabase(): Promise<TestDatabase & { url: string }> {
  return freshDatabaseOn(POSTGRES_SERVER_URL);
}

async function freshDatabaseOn(server: string): Promise<TestDatabase & { url: string }> {
  const name = `kf_${randomBytes(6).toString('hex')}`;
  await onMaintenance(server, `CREATE DATABASE ${name}`);
  const url = new URL(server);
  url.pathname = `/${name}`;
  return { url: url.toString(), drop: () => onMaintenance(server, `DROP DATABASE IF EXISTS ${name} WITH (FORCE)`) };
}

async function onMaintenance(server: string, sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: server });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}
