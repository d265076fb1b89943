import type { Sequelize } from 'sequelize';
import { isPostgres, positionOf } from './dialect';

/** SQL for a flag mask: `position` is the dialect's substring search, `flags` the JSON array column. */
export type FlagMaskSql = (position: string, flags: string) => string;

/**
 * Triggers that keep `clips.flagMask` and `clips.flagCount` equal to what `clips.flags` says, on every insert and
 * every change of `flags` (migration 0006). SQLite updates the row again after the write; PostgreSQL sets the two
 * columns on the row before it is written, from a PL/pgSQL function.
 */
export function flagTriggers(sequelize: Sequelize, maskOf: FlagMaskSql) {
  const position = positionOf(sequelize);
  const assignments = (row: string) =>
    `"flagMask" = ${maskOf(position, `${row}"flags"${isPostgres(sequelize) ? '::text' : ''}`)}, ` +
    `"flagCount" = json_array_length(${row}"flags")`;
  if (isPostgres(sequelize)) {
    const mask = maskOf(position, 'NEW."flags"::text');
    return {
      assignments,
      create: [
        `CREATE FUNCTION clips_flag_mask() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN
           NEW."flagMask" := ${mask}; NEW."flagCount" := json_array_length(NEW."flags"); RETURN NEW; END $$`,
        `CREATE TRIGGER clips_flag_mask BEFORE INSERT OR UPDATE OF "flags" ON clips
           FOR EACH ROW EXECUTE FUNCTION clips_flag_mask()`,
      ],
      drop: ['DROP TRIGGER clips_flag_mask ON clips', 'DROP FUNCTION clips_flag_mask()'],
    };
  }
  const triggers: [name: string, event: string][] = [
    ['clips_flag_mask_insert', 'AFTER INSERT ON clips'],
    ['clips_flag_mask_update', 'AFTER UPDATE OF flags ON clips'],
  ];
  return {
    assignments,
    create: triggers.map(
      ([name, event]) =>
        `CREATE TRIGGER ${name} ${event} BEGIN UPDATE clips SET ${assignments('NEW.')} WHERE id = NEW.id; END`,
    ),
    drop: triggers.reverse().map(([name]) => `DROP TRIGGER ${name}`),
  };
}
