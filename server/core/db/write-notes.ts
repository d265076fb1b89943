import type { Sequelize } from 'sequelize';
import { noteWrite } from './count-cache';
import { isWrite } from './write-queue';

/**
 * Tells the count cache about every write of this process, for a database that needs no write queue (PostgreSQL):
 * a managed transaction when it ends, a lone write when it is done.
 */
export function noteEveryWrite(sequelize: Sequelize): void {
  const transaction = sequelize.transaction.bind(sequelize) as (...args: unknown[]) => Promise<unknown>;
  (sequelize as unknown as { transaction: unknown }).transaction = (options: unknown, callback?: unknown) => {
    const managed = typeof options === 'function' || typeof callback === 'function';
    const started = transaction(options, callback);
    return managed ? started.finally(noteWrite) : started;
  };
  const query = sequelize.query.bind(sequelize) as (sql: unknown, options?: object) => Promise<unknown>;
  (sequelize as unknown as { query: unknown }).query = (sql: unknown, options?: object) => {
    const done = query(sql, options);
    return isWrite(sql, options) ? done.finally(noteWrite) : done;
  };
}
