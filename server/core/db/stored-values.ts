/**
 * Column values as a raw SELECT answers them, read the way Sequelize's models read them, for the lean list reads
 * that skip model instances. SQLite gives booleans as 0/1, JSON as text and dates as text; PostgreSQL gives
 * booleans, parsed JSON and Date objects.
 */

/** A stored date as ISO text. SQLite text without an offset is UTC, Kinefold's connection time zone. */
export function storedIso(stored: string | Date): string {
  if (stored instanceof Date) return stored.toISOString();
  return new Date(stored.includes('+') ? stored : `${stored}+00:00`).toISOString();
}

export function storedIsoOrNull(stored: string | Date | null): string | null {
  return stored === null ? null : storedIso(stored);
}

export function storedBoolean(stored: number | boolean): boolean {
  return Boolean(stored);
}

/** A JSON column's value, parsed when it comes as text. */
export function storedJson<T>(stored: string | T): T {
  return typeof stored === 'string' ? (JSON.parse(stored) as T) : stored;
}
