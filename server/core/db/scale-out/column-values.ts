/**
 * SQLite's values as PostgreSQL's columns take them. The migrations declare one schema for both databases, but
 * Sequelize stores some types differently on each: on SQLite a BOOLEAN is the integer 0 or 1, a DATE is text
 * (`2026-04-07 09:15:00.000 +00:00`), a JSON column is text (or, as SQLite gives a column declared JSON numeric
 * affinity, a bare number), a BLOB is bytes; on PostgreSQL they are boolean, timestamptz, json and bytea. Integers,
 * floats and text pass as they are.
 */

/** How a PostgreSQL column's values are made from SQLite's: by the column's data_type in information_schema. */
export type ColumnKind = 'boolean' | 'timestamp' | 'json' | 'bytes' | 'plain';

export function columnKind(dataType: string): ColumnKind {
  switch (dataType) {
    case 'boolean':
      return 'boolean';
    case 'timestamp with time zone':
    case 'timestamp without time zone':
      return 'timestamp';
    case 'json':
    case 'jsonb':
      return 'json';
    case 'bytea':
      return 'bytes';
    default:
      return 'plain';
  }
}

/** A value that has no meaning in its PostgreSQL column; the message says what was found. */
export class UnconvertibleValue extends Error {}

/** A time of day followed by its zone: `09:15:00.000 +00:00`, `09:15Z`, `09:15:00-0500`. */
const TIME_WITH_ZONE = /\d:\d\d(:\d\d(\.\d+)?)?\s*(Z|[+-]\d\d(:?\d\d)?)$/i;
/** A day alone, which JavaScript reads as midnight UTC (ECMA-262, Date Time String Format). */
const DAY_ONLY = /^\d{4}-\d\d-\d\d$/;

/**
 * The instant a SQLite DATE column's text means, read as Sequelize reads it there: with its zone when it has one,
 * otherwise as UTC (SQLite's own datetime() writes UTC without a zone). Null when the text is no date.
 */
export function sqliteInstant(text: string): Date | null {
  const trimmed = text.trim();
  const zoned = TIME_WITH_ZONE.test(trimmed) || DAY_ONLY.test(trimmed);
  const instant = new Date(zoned ? trimmed : `${trimmed}+00:00`);
  return Number.isNaN(instant.getTime()) ? null : instant;
}

/** The value to bind for a PostgreSQL column of `kind`, from what SQLite gave; null stays null. */
export function toPostgres(value: unknown, kind: ColumnKind): unknown {
  if (value === null || value === undefined) return null;
  switch (kind) {
    case 'boolean':
      if (value === 1 || value === '1' || value === true || value === 'true') return true;
      if (value === 0 || value === '0' || value === false || value === 'false') return false;
      throw new UnconvertibleValue(`${describe(value)} is not a boolean (0 or 1)`);
    case 'timestamp': {
      const instant = typeof value === 'string' ? sqliteInstant(value) : null;
      if (!instant) throw new UnconvertibleValue(`${describe(value)} is not a date`);
      // The ISO form with its zone: PostgreSQL stores the same instant whatever its session's time zone.
      return instant.toISOString();
    }
    case 'json':
      // Text is the JSON as written (PostgreSQL's json keeps it verbatim); a number came back from numeric affinity.
      if (typeof value === 'string') return value;
      if (typeof value === 'number' && Number.isFinite(value)) return String(value);
      throw new UnconvertibleValue(`${describe(value)} is not JSON text`);
    case 'bytes':
      if (Buffer.isBuffer(value)) return value;
      throw new UnconvertibleValue(`${describe(value)} is not bytes`);
    case 'plain':
      if (Buffer.isBuffer(value)) throw new UnconvertibleValue(`${describe(value)} in a column that holds no bytes`);
      return value;
  }
}

function describe(value: unknown): string {
  if (Buffer.isBuffer(value)) return `${value.length} bytes`;
  const text = typeof value === 'string' ? JSON.stringify(value) : String(value);
  return text.length > 60 ? `${text.slice(0, 57)}…` : text;
}
