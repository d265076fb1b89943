import { Op, col, fn, where, type WhereOptions } from 'sequelize';

/**
 * Rows where any of `columns` contains `search`, ignoring (ASCII) case as LIKE does. instr() reads the search
 * literally, so `%` and `_` typed by a person are plain characters, with no ESCAPE clause to get right.
 */
export function containsText<M>(columns: string[], search: string): WhereOptions<M> {
  const needle = search.toLowerCase();
  return { [Op.or]: columns.map((column) => where(fn('instr', fn('lower', col(column)), needle), Op.gt, 0)) };
}
