import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';

/**
 * Connections that only read, beside the one Sequelize's SQLite dialect keeps for everything outside a transaction.
 * node-sqlite3 runs one connection's statements one at a time, so with every read on that one connection the list
 * pages of 50 concurrent clients queued behind each other on a single core while the other idled
 * (docs/benchmarks.md, "Load"). One reader per core lets two reads run at once; WAL lets readers and the writer
 * proceed side by side, and a write outside a transaction has committed before its promise settles, so a read that
 * follows it on a reader sees it.
 */
export const READ_CONNECTIONS = 2;

interface ReadOptions {
  type?: string;
  transaction?: Transaction | null;
  /** The connection Sequelize's SQLite connection manager keeps and reuses under this key. */
  uuid?: string;
}

/**
 * Sends each plain SELECT outside a transaction to the reader with the fewest statements in flight. Everything
 * else (writes, schema reads, transactions and what runs inside them) keeps the connection it had: a transaction
 * must read its own uncommitted rows.
 */
export function readOnReaderConnections(sequelize: Sequelize, readers = READ_CONNECTIONS): void {
  const inFlight = new Array<number>(readers).fill(0);
  const query = sequelize.query.bind(sequelize) as (sql: unknown, options?: ReadOptions) => Promise<unknown>;
  (sequelize as unknown as { query: unknown }).query = (sql: unknown, options?: ReadOptions) => {
    if (options?.type !== QueryTypes.SELECT || options.transaction || options.uuid) return query(sql, options);
    const reader = inFlight.indexOf(Math.min(...inFlight));
    inFlight[reader]! += 1;
    return query(sql, { ...options, uuid: `reader-${reader}` }).finally(() => {
      inFlight[reader]! -= 1;
    });
  };
}
