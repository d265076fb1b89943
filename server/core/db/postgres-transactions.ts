import { AsyncLocalStorage } from 'node:async_hooks';
import PQueue from 'p-queue';
import type { Sequelize, Transaction } from 'sequelize';
import { noteWrite } from './reused-reads';
import { isWrite } from './write-queue';

/** The advisory lock every managed transaction takes; any fixed number, the same in every Kinefold process. */
const TRANSACTION_LOCK = 0x4b696e65;

type TransactionCallback = (transaction: Transaction) => Promise<unknown>;

/**
 * Gives PostgreSQL the one guarantee Kinefold's services were written for on SQLite: managed transactions run one
 * at a time across every process (there, BEGIN IMMEDIATE takes the database's single write lock). Checks such as
 * "the quota has room, so reserve it" or "no warning yet at 80 %, so send one" read, decide and write in one
 * transaction and count on no other transaction doing the same meanwhile; under PostgreSQL's READ COMMITTED two
 * could both pass. So each managed transaction first takes a transaction-scoped advisory lock, released at commit or
 * rollback. Inside one process they also wait their turn in a queue before taking a pooled connection, so waiting
 * transactions never hold every connection while the one in turn needs another for a read.
 *
 * Lone statements (job and mail claims, lease renewals, reads) take no lock: each is atomic by itself, and claims
 * pick their row FOR UPDATE SKIP LOCKED. A transaction started inside one in turn (without passing it on) neither
 * queues nor locks again, so it cannot wait for itself. Every write is reported to the count cache.
 */
export function serializeTransactions(sequelize: Sequelize): void {
  const queue = new PQueue({ concurrency: 1 });
  const holding = new AsyncLocalStorage<true>();

  const transaction = sequelize.transaction.bind(sequelize) as (...args: unknown[]) => Promise<unknown>;
  const query = sequelize.query.bind(sequelize) as (sql: unknown, options?: object) => Promise<unknown>;
  (sequelize as unknown as { transaction: unknown }).transaction = (options: unknown, callback?: unknown) => {
    const managed = (typeof options === 'function' ? options : callback) as TransactionCallback | undefined;
    const nested =
      typeof options === 'object' &&
      options !== null &&
      'transaction' in options &&
      (options as { transaction?: unknown }).transaction;
    if (!managed || nested) return transaction(options, callback);
    if (holding.getStore()) return transaction(options, callback).finally(noteWrite);
    const settings = typeof options === 'object' && options !== null ? options : {};
    const locked = (t: Transaction) =>
      query('SELECT pg_advisory_xact_lock(:lock)', { transaction: t, replacements: { lock: TRANSACTION_LOCK } }).then(
        () => managed(t),
      );
    return queue.add(() => holding.run(true, () => transaction(settings, locked))).finally(noteWrite);
  };

  (sequelize as unknown as { query: unknown }).query = (sql: unknown, options?: object) => {
    const done = query(sql, options);
    return isWrite(sql, options) ? done.finally(noteWrite) : done;
  };
}
