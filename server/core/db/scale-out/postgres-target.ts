import type pg from 'pg';
import { columnKind, toPostgres, UnconvertibleValue, type ColumnKind } from './column-values';
import { CopyRefused, TableCopyFailed } from './copy-errors';
import type { TableReference } from './copy-order';
import { quote } from './quote';
import type { SqliteSource, TableExtent } from './sqlite-source';

/** The table where a copy records each table it finished (migration 0016). */
export const COPIES_TABLE = 'scale_out_copies';

/** What the copy's record says of one table: from which installation, and how much of it. */
export interface RecordedCopy extends TableExtent {
  sourceKey: string;
}

export interface TargetTable {
  name: string;
  columns: { name: string; kind: ColumnKind }[];
  /** Columns filled from a sequence (autoincrement ids), whose sequence must go on after the copied rows. */
  sequenced: string[];
}

/** PostgreSQL takes at most 65,535 parameters per statement. */
const MAX_PARAMETERS = 65_535;
/** Rows per INSERT: one statement per 1,000 rows keeps round trips few and each batch small in memory. */
const ROWS_PER_BATCH = 1_000;
/** Rows per INSERT where a row holds bytes (moment descriptors, cluster labels), which can be large. */
const ROWS_PER_BATCH_WITH_BYTES = 100;

/**
 * The PostgreSQL side of the copy, over one connection of the `pg` driver: what the database holds, and copying one
 * table in one transaction together with its line in the copy's record.
 */
export class PostgresTarget {
  constructor(private readonly client: pg.ClientBase) {}

  private async rows<T>(sql: string, params: unknown[] = []): Promise<T[]> {
    return (await this.client.query(sql, params)).rows as T[];
  }

  /** The tables of the current schema. */
  async tables(): Promise<string[]> {
    const rows = await this.rows<{ name: string }>(
      `SELECT table_name AS name FROM information_schema.tables
       WHERE table_schema = current_schema() AND table_type = 'BASE TABLE' ORDER BY table_name`,
    );
    return rows.map((row) => row.name);
  }

  async hasRows(table: string): Promise<boolean> {
    const [row] = await this.rows<{ found: boolean }>(`SELECT EXISTS (SELECT 1 FROM ${quote(table)}) AS found`);
    return row!.found;
  }

  async rowCount(table: string): Promise<number> {
    const [row] = await this.rows<{ count: number }>(`SELECT COUNT(*) AS count FROM ${quote(table)}`);
    return Number(row!.count);
  }

  /** The migrations run here, or null before the first. */
  async migrationsRun(): Promise<string[] | null> {
    if (!(await this.tables()).includes('schema_migrations')) return null;
    return (await this.rows<{ name: string }>('SELECT name FROM schema_migrations')).map((row) => row.name);
  }

  /** The copy's record, table by table (empty before migration 0016 has run). */
  async recordedCopies(): Promise<Map<string, RecordedCopy>> {
    if (!(await this.tables()).includes(COPIES_TABLE)) return new Map();
    const rows = await this.rows<{ tableName: string; sourceKey: string; rowCount: number; lastRowid: number }>(
      `SELECT "tableName", "sourceKey", "rowCount", "lastRowid" FROM ${COPIES_TABLE}`,
    );
    return new Map(
      rows.map((row) => [
        row.tableName,
        { sourceKey: row.sourceKey, rowCount: Number(row.rowCount), lastRowid: Number(row.lastRowid) },
      ]),
    );
  }

  async describe(table: string): Promise<TargetTable> {
    const columns = await this.rows<{ name: string; dataType: string; sequenced: boolean }>(
      `SELECT column_name AS name, data_type AS "dataType",
         COALESCE(column_default LIKE 'nextval(%', FALSE) AS sequenced
       FROM information_schema.columns
       WHERE table_schema = current_schema() AND table_name = $1 ORDER BY ordinal_position`,
      [table],
    );
    return {
      name: table,
      columns: columns.map((column) => ({ name: column.name, kind: columnKind(column.dataType) })),
      sequenced: columns.filter((column) => column.sequenced).map((column) => column.name),
    };
  }

  /** Every foreign key of the current schema, as table → referenced table. */
  async references(): Promise<TableReference[]> {
    return this.rows<TableReference>(
      `SELECT child.relname AS table, parent.relname AS references
       FROM pg_constraint
       JOIN pg_class child ON child.oid = pg_constraint.conrelid
       JOIN pg_class parent ON parent.oid = pg_constraint.confrelid
       WHERE pg_constraint.contype = 'f' AND child.relnamespace = current_schema()::regnamespace`,
    );
  }

  /**
   * Copies the source's rows of `table` in one transaction: rows in batches of consecutive rowids, converted to the
   * column types; each sequence moved on to the largest id + 1; the table's line in the copy's record. Stopped
   * anywhere (a bad row, a lost connection, the process killed), PostgreSQL keeps nothing of it.
   */
  async copyTable(
    table: TargetTable,
    source: SqliteSource,
    record: RecordedCopy,
    onBatch: (copied: number) => void,
  ): Promise<number> {
    const names = table.columns.map((column) => column.name);
    const withBytes = table.columns.some((column) => column.kind === 'bytes');
    const size = Math.min(
      withBytes ? ROWS_PER_BATCH_WITH_BYTES : ROWS_PER_BATCH,
      Math.floor(MAX_PARAMETERS / names.length),
    );
    const insert = `INSERT INTO ${quote(table.name)} (${names.map(quote).join(', ')}) VALUES `;
    await this.client.query('BEGIN');
    try {
      // Checked again inside the transaction: nobody else may have written here since the plan was made.
      if (await this.hasRows(table.name)) {
        throw new CopyRefused(
          `PostgreSQL's table ${table.name} was written to by someone else during the copy: Kinefold is running on ` +
            'it. Stop it, then copy into a new, empty database.',
        );
      }
      let copied = 0;
      const batches = source.batches(table.name, names, size);
      // The next batch is read from SQLite while PostgreSQL inserts this one.
      let next = batches.next();
      for (let read = await next; !read.done; read = await next) {
        const batch = read.value;
        next = batches.next();
        // Failing below, the copy stops: the read under way then ends unheard, not as an unhandled rejection.
        next.catch(() => undefined);
        const values: unknown[] = [];
        const tuples = batch.map((row) => {
          const placeholders = row.values.map((value, i) => {
            values.push(converted(table, i, row.rowid, value));
            return `$${values.length}`;
          });
          return `(${placeholders.join(', ')})`;
        });
        // A whole batch has the same statement every time: prepared once per table, PostgreSQL parses and plans it
        // once (on 150,000 audit rows that took about 40 % off the time PostgreSQL spent on the inserts).
        const name = batch.length === size ? `kinefold-copy-${table.name}` : undefined;
        try {
          await this.client.query({ name, text: insert + tuples.join(', '), values });
        } catch (error) {
          const { message, detail } = error as { message: string; detail?: string };
          throw new TableCopyFailed(
            `${table.name}, rows ${batch[0]!.rowid} to ${batch[batch.length - 1]!.rowid} (rowid): ${message}` +
              (detail ? ` (${detail})` : ''),
          );
        }
        copied += batch.length;
        onBatch(copied);
      }
      if (copied !== record.rowCount) {
        throw new TableCopyFailed(`${table.name}: read ${copied} rows where the source held ${record.rowCount}`);
      }
      for (const column of table.sequenced) {
        await this.client.query(
          `SELECT setval(pg_get_serial_sequence($1, $2), COALESCE(MAX(${quote(column)}), 0) + 1, false)
           FROM ${quote(table.name)}`,
          [quote(table.name), column],
        );
      }
      await this.client.query(
        `INSERT INTO ${COPIES_TABLE} ("tableName", "sourceKey", "rowCount", "lastRowid", "copiedAt")
         VALUES ($1, $2, $3, $4, $5)`,
        [table.name, record.sourceKey, record.rowCount, record.lastRowid, new Date().toISOString()],
      );
      await this.client.query('COMMIT');
      return copied;
    } catch (error) {
      await this.client.query('ROLLBACK').catch(() => undefined);
      throw error;
    }
  }
}

function converted(table: TargetTable, index: number, rowid: number, value: unknown): unknown {
  const column = table.columns[index]!;
  try {
    return toPostgres(value, column.kind);
  } catch (error) {
    if (!(error instanceof UnconvertibleValue)) throw error;
    throw new TableCopyFailed(`${table.name}.${column.name}, row ${rowid} (rowid): ${error.message}`);
  }
}
