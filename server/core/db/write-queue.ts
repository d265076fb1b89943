import { AsyncLocalStorage } from 'node:async_hooks';
import { setTimeout as sleep } from 'node:timers/promises';
import PQueue from 'p-queue';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { noteWrite } from './reused-reads';

/**
 * How long one statement may let SQLite's busy handler wait inside a libuv pool thread. Kept tiny: a waiting
 * handler holds the thread, and the pool (4 threads) also carries every file read and write of the process, so
 * long waits there stall uploads that have nothing to do with the database.
 */
export const POOL_BUSY_WAIT_MS = 20;

/** Longest a write waits, in total, for another process (the worker) to let go of the write lock. */
export const WRITE_WAIT_LIMIT_MS = 15_000;

const RETRY_DELAYS_MS = [2, 5, 10, 20, 40, 80];

const WRITE_TYPES = new Set<string>([
  QueryTypes.INSERT,
  QueryTypes.UPDATE,
  QueryTypes.BULKUPDATE,
  QueryTypes.BULKDELETE,
  QueryTypes.DELETE,
  QueryTypes.UPSERT,
]);
const WRITE_SQL = /^\s*(INSERT|UPDATE|DELETE|REPLACE)\b/i;

interface QueryOptions {
  type?: string;
  transaction?: Transaction | null;
}

type TransactionCallback = (transaction: Transaction) => Promise<unknown>;

/**
 * Makes one process's writes take turns in JavaScript instead of in SQLite's busy handler (DESIGN §4):
 *
 * - every managed transaction and every write outside a transaction runs through one FIFO queue, so two writers of
 *   the same process never wait on each other inside SQLite;
 * - when another process holds the lock, `BEGIN IMMEDIATE` or the lone write fails fast with SQLITE_BUSY and is
 *   tried again after a timer, so the wait costs no pool thread.
 *
 * Work started inside a queued transaction (a nested transaction, a write that forgot its `transaction` option)
 * is not queued again, so it cannot wait for itself; it behaves as it did before the queue existed.
 */
export function queueWrites(sequelize: Sequelize): void {
  const queue = new PQueue({ concurrency: 1 });
  const holding = new AsyncLocalStorage<true>();
  const inTurn = <T>(work: () => Promise<T>): Promise<T> =>
    holding.getStore() ? work() : queue.add(() => holding.run(true, work));

  const transaction = sequelize.transaction.bind(sequelize) as (...args: unknown[]) => Promise<unknown>;
  (sequelize as unknown as { transaction: unknown }).transaction = (options: unknown, callback?: unknown) => {
    const managed = (typeof options === 'function' ? options : callback) as TransactionCallback | undefined;
    const nested =
      typeof options === 'object' &&
      options !== null &&
      'transaction' in options &&
      (options as { transaction?: unknown }).transaction;
    // Unmanaged and nested transactions keep Sequelize's own behaviour: their end is not ours to see.
    if (!managed || nested) return transaction(options, callback);
    // Its writes become visible at commit: counts made meanwhile must not outlive it.
    return inTurn(() => transaction(options, callback)).finally(noteWrite);
  };

  const queryInterface = sequelize.getQueryInterface();
  const startTransaction = queryInterface.startTransaction.bind(queryInterface);
  queryInterface.startTransaction = (...args: Parameters<typeof startTransaction>) =>
    whileBusy(() => startTransaction(...args));

  const query = sequelize.query.bind(sequelize) as (sql: unknown, options?: QueryOptions) => Promise<unknown>;
  (sequelize as unknown as { query: unknown }).query = (sql: unknown, options?: QueryOptions) => {
    if (!isWrite(sql, options)) return query(sql, options);
    const write = options?.transaction ? query(sql, options) : inTurn(() => whileBusy(() => query(sql, options)));
    return write.finally(noteWrite);
  };
}

export function isWrite(sql: unknown, options?: QueryOptions): boolean {
  if (options?.type && WRITE_TYPES.has(options.type)) return true;
  const text = typeof sql === 'string' ? sql : (sql as { query?: unknown } | null)?.query;
  return typeof text === 'string' && WRITE_SQL.test(text);
}

/** SQLite refused the lock: the statement changed nothing, so running it again is safe. */
export function isBusy(error: unknown): boolean {
  const parent = error as { parent?: { code?: string }; code?: string } | null;
  return parent?.parent?.code === 'SQLITE_BUSY' || parent?.code === 'SQLITE_BUSY';
}

async function whileBusy<T>(work: () => Promise<T>): Promise<T> {
  const deadline = Date.now() + WRITE_WAIT_LIMIT_MS;
  for (let attempt = 0; ; attempt += 1) {
    try {
      return await work();
    } catch (error) {
      if (!isBusy(error) || Date.now() >= deadline) throw error;
      await sleep(RETRY_DELAYS_MS[Math.min(attempt, RETRY_DELAYS_MS.length - 1)]);
    }
  }
}
