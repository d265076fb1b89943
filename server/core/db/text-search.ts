import { Op, col, fn, where, type Sequelize, type WhereOptions } from 'sequelize';
import { positionOf } from './dialect';

/**
 * Rows where any of `columns` contains `search`, ignoring case. instr() (SQLite) and strpos() (PostgreSQL) read
 * the search literally, so `%` and `_` typed by a person are plain characters, with no ESCAPE clause to get right.
 * SQLite's lower() folds ASCII letters only, PostgreSQL's every letter: a search for "É" finds "é" only there.
 */
export function containsText<M>(sequelize: Sequelize, columns: string[], search: string): WhereOptions<M> {
  const needle = search.toLowerCase();
  const position = positionOf(sequelize);
  return { [Op.or]: columns.map((column) => where(fn(position, fn('lower', col(column)), needle), Op.gt, 0)) };
}
