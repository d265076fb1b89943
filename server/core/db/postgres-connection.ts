import pg from 'pg';
import { Sequelize } from 'sequelize';
import { postgresTls, PostgresTlsError, type PostgresTls } from './postgres-tls';
import { serializeTransactions } from './postgres-transactions';

/**
 * PostgreSQL answers 64-bit integers (BIGINT byte counts, COUNT(*)) and NUMERIC (SUM over BIGINT) as strings so
 * that no digit is lost; Kinefold's counts and byte totals stay far below 2^53, so they are read as numbers,
 * as SQLite gives them.
 */
pg.types.setTypeParser(pg.types.builtins.INT8, Number);
pg.types.setTypeParser(pg.types.builtins.NUMERIC, Number);

/** Connections one process keeps open: the server's requests and a worker's jobs rarely need more at once. */
const POOL_MAX = 10;

/** The database could not be reached or refused us: a one-line message for the person starting the process. */
export class DatabaseStartupError extends Error {}

/**
 * Opens the PostgreSQL database named by KINEFOLD_DATABASE_URL through the `pg` driver, over TLS as its `sslmode`
 * and KINEFOLD_DATABASE_CA (`caFile`) say (postgres-tls.ts), with managed transactions taking turns as on SQLite
 * (postgres-transactions.ts). The connection is tried at once, so a wrong URL or TLS setting stops the process at
 * startup rather than at the first request.
 */
export async function openPostgresDatabase(url: string, caFile: string | null): Promise<Sequelize> {
  let tls: PostgresTls;
  try {
    tls = postgresTls(url, caFile);
  } catch (error) {
    if (error instanceof PostgresTlsError) throw new DatabaseStartupError(error.message);
    throw error;
  }
  const sequelize = new Sequelize(tls.url, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: false,
    pool: { max: POOL_MAX, min: 0, idle: 10_000 },
    define: { underscored: false, freezeTableName: false },
    dialectOptions: { ssl: tls.ssl },
  });
  try {
    await sequelize.authenticate();
  } catch (error) {
    await sequelize.close().catch(() => undefined);
    throw new DatabaseStartupError(
      `KINEFOLD_DATABASE_URL: cannot open the PostgreSQL database at ${postgresLocation(url)}: ${reason(error)}`,
    );
  }
  serializeTransactions(sequelize);
  return sequelize;
}

/** Host, port and database name of the URL, never its password. */
export function postgresLocation(url: string): string {
  try {
    const parsed = new URL(url);
    return `${parsed.hostname}:${parsed.port || '5432'}${parsed.pathname}`;
  } catch {
    return 'an unreadable URL';
  }
}

function reason(error: unknown): string {
  const parent = (error as { parent?: { code?: string; message?: string } }).parent;
  const message = parent?.message || (error instanceof Error ? error.message : String(error));
  return parent?.code && !message.includes(parent.code) ? `${message} (${parent.code})` : message;
}
