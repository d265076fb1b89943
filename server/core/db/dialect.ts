import type { Sequelize } from 'sequelize';

/**
 * The few places where SQLite and PostgreSQL spell SQL differently, in one module. Everything else in raw SQL is
 * written once for both: identifiers in double quotes (PostgreSQL folds unquoted names to lower case, and Kinefold's
 * columns are camelCase), booleans compared with TRUE/FALSE, no backticks.
 */
export function isPostgres(sequelize: Sequelize): boolean {
  return sequelize.getDialect() === 'postgres';
}

/**
 * `INDEXED BY name` on SQLite, whose planner is told which covering index to walk (migration 0006); PostgreSQL has
 * no such clause and chooses from its statistics.
 */
export function indexedBy(sequelize: Sequelize, index: string): string {
  return isPostgres(sequelize) ? '' : `INDEXED BY ${index}`;
}

/**
 * An ORDER BY term that puts NULL first going up and last going down, SQLite's rule (PostgreSQL's default is the
 * other way round), so lists and keyset walks agree on both databases.
 */
export function orderTerm(sequelize: Sequelize, column: string, direction: 'ASC' | 'DESC'): string {
  if (!isPostgres(sequelize)) return `${column} ${direction}`;
  return `${column} ${direction} ${direction === 'ASC' ? 'NULLS FIRST' : 'NULLS LAST'}`;
}

/** True when the JSON array in `column` holds one of the (already escaped) string literals `values`. */
export function jsonArrayHasAny(sequelize: Sequelize, column: string, values: string): string {
  return isPostgres(sequelize)
    ? `EXISTS (SELECT 1 FROM json_array_elements_text(${column}) AS element(value) WHERE element.value IN (${values}))`
    : `EXISTS (SELECT 1 FROM json_each(${column}) WHERE json_each.value IN (${values}))`;
}

/** The whole number stored under `key` of the JSON object in `column` (`key` is ours, never input). */
export function jsonInteger(sequelize: Sequelize, column: string, key: string): string {
  return isPostgres(sequelize) ? `CAST(${column} ->> '${key}' AS INTEGER)` : `json_extract(${column}, '$.${key}')`;
}

/** The larger of two values: SQLite's two-argument MAX, PostgreSQL's GREATEST. */
export function larger(sequelize: Sequelize, a: string, b: string): string {
  return `${isPostgres(sequelize) ? 'GREATEST' : 'MAX'}(${a}, ${b})`;
}

/** The 1-based position of `needle` in `haystack`, 0 when absent: SQLite's instr, PostgreSQL's strpos. */
export function positionOf(sequelize: Sequelize): 'instr' | 'strpos' {
  return isPostgres(sequelize) ? 'strpos' : 'instr';
}

/**
 * The tail of a subquery that picks a row for an UPDATE to take (a job, a message to send). On PostgreSQL the row
 * is locked as it is picked and rows another transaction is taking are passed over, so two takers never update the
 * same row and neither waits for the other. SQLite's writers take turns, so its statement needs nothing.
 */
export function pickForUpdate(sequelize: Sequelize): string {
  return isPostgres(sequelize) ? 'FOR UPDATE SKIP LOCKED' : '';
}
