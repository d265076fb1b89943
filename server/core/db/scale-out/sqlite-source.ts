import { createHash } from 'node:crypto';
import sqlite3 from 'sqlite3';
import { sqliteInstant } from './column-values';
import { quote } from './quote';

/** How much of a table there is: what a finished copy records, and what tells a changed source apart. */
export interface TableExtent {
  rowCount: number;
  /** The highest rowid, 0 for an empty table. */
  lastRowid: number;
}

/** One row read for the copy: its rowid (where the next batch starts) and its values in the columns' order. */
export interface SourceRow {
  rowid: number;
  values: unknown[];
}

/** A worker that may still write: it beat within its lease, or holds a job whose lease has not run out. */
export interface LiveWorker {
  name: string;
  /** Seconds since its last heartbeat, when it has one. */
  quietS: number | null;
  leaseS: number | null;
  jobsLeased: number;
}

/**
 * A SQLite installation's database opened read-only for the copy: the copy can never change it, and every read
 * happens inside one read transaction, so what is copied is one consistent state of the file (WAL keeps it for
 * this reader while another process writes) even if a process writes meanwhile; `extentNow` looks past that state,
 * to tell whether anything was written during the copy.
 */
export class SqliteSource {
  private constructor(
    readonly file: string,
    private readonly database: sqlite3.Database,
  ) {}

  static async open(file: string): Promise<SqliteSource> {
    const database = await new Promise<sqlite3.Database>((resolve, reject) => {
      const opened: sqlite3.Database = new sqlite3.Database(file, sqlite3.OPEN_READONLY, (error) =>
        error ? reject(error) : resolve(opened),
      );
    });
    const source = new SqliteSource(file, database);
    await source.all('BEGIN');
    // The first read fixes the state this connection sees until the transaction ends.
    await source.all('SELECT COUNT(*) FROM sqlite_master');
    return source;
  }

  all<T = Record<string, unknown>>(sql: string, params: unknown[] = []): Promise<T[]> {
    return new Promise((resolve, reject) =>
      this.database.all(sql, params, (error, rows) => (error ? reject(error) : resolve(rows as T[]))),
    );
  }

  /** The tables of the file, SQLite's own left out. */
  async tables(): Promise<string[]> {
    const rows = await this.all<{ name: string }>(
      "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite\\_%' ESCAPE '\\' ORDER BY name",
    );
    return rows.map((row) => row.name);
  }

  async columns(table: string): Promise<string[]> {
    const rows = await this.all<{ name: string }>(`PRAGMA table_info(${quote(table)})`);
    return rows.map((row) => row.name);
  }

  async extent(table: string): Promise<TableExtent> {
    const [row] = await this.all<{ rowCount: number; lastRowid: number | null }>(
      `SELECT COUNT(*) AS "rowCount", MAX(rowid) AS "lastRowid" FROM ${quote(table)}`,
    );
    return { rowCount: row!.rowCount, lastRowid: row!.lastRowid ?? 0 };
  }

  /** The table's extent as the file holds it now, outside this reader's transaction. */
  async extentNow(table: string): Promise<TableExtent> {
    const fresh = await SqliteSource.open(this.file);
    try {
      return await fresh.extent(table);
    } finally {
      await fresh.close();
    }
  }

  /** The table's rows in rowid order, `size` at a time: only one batch is in memory at once. */
  async *batches(table: string, columns: readonly string[], size: number): AsyncGenerator<SourceRow[]> {
    const select = `SELECT rowid AS "kinefold rowid", ${columns.map(quote).join(', ')} FROM ${quote(table)}
      WHERE rowid > ? ORDER BY rowid LIMIT ?`;
    for (let after = Number.MIN_SAFE_INTEGER; ;) {
      const rows = await this.all(select, [after, size]);
      if (rows.length === 0) return;
      yield rows.map((row) => ({
        rowid: row['kinefold rowid'] as number,
        values: columns.map((column) => row[column]),
      }));
      after = rows[rows.length - 1]!['kinefold rowid'] as number;
    }
  }

  /** The migrations the file has run (none when it has no migration table: then it is no Kinefold database). */
  async migrationsRun(): Promise<string[] | null> {
    if (!(await this.tables()).includes('schema_migrations')) return null;
    return (await this.all<{ name: string }>('SELECT name FROM schema_migrations ORDER BY name')).map(
      (row) => row.name,
    );
  }

  /**
   * Which installation this is: a digest of its first account (id, e-mail, creation time), which no other
   * installation shares and which a copy carries over unchanged. The same for an installation without accounts.
   */
  async sourceKey(): Promise<string> {
    const [first] = await this.all<{ id: number; email: string; createdAt: string }>(
      'SELECT id, email, "createdAt" FROM users ORDER BY id LIMIT 1',
    );
    const identity = first ? `${first.id}\n${first.email}\n${first.createdAt}` : 'no accounts';
    return createHash('sha256').update(identity).digest('hex');
  }

  /** Workers that may still be writing at `now` (worker_presences and the leases of running jobs). */
  async liveWorkers(now: Date): Promise<LiveWorker[]> {
    const presences = await this.all<{ name: string; leaseS: number; lastBeatAt: string }>(
      'SELECT name, "leaseS", "lastBeatAt" FROM worker_presences WHERE "stoppedAt" IS NULL',
    );
    const leases = await this.all<{ leaseOwner: string; leaseExpiresAt: string | null }>(
      `SELECT "leaseOwner", "leaseExpiresAt" FROM jobs WHERE state = 'running' AND "leaseOwner" IS NOT NULL`,
    );
    const live = new Map<string, LiveWorker>();
    for (const presence of presences) {
      const beat = sqliteInstant(presence.lastBeatAt);
      const quietS = beat ? (now.getTime() - beat.getTime()) / 1000 : null;
      if (quietS !== null && quietS < presence.leaseS) {
        live.set(presence.name, { name: presence.name, quietS, leaseS: presence.leaseS, jobsLeased: 0 });
      }
    }
    for (const lease of leases) {
      const expires = lease.leaseExpiresAt ? sqliteInstant(lease.leaseExpiresAt) : null;
      const held = live.get(lease.leaseOwner);
      if (held) held.jobsLeased += 1;
      else if (expires && expires > now) {
        live.set(lease.leaseOwner, { name: lease.leaseOwner, quietS: null, leaseS: null, jobsLeased: 1 });
      }
    }
    return [...live.values()];
  }

  close(): Promise<void> {
    return new Promise((resolve, reject) => this.database.close((error) => (error ? reject(error) : resolve())));
  }
}
