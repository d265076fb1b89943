import fs from 'node:fs';
import path from 'node:path';
import { Sequelize, Transaction } from 'sequelize';
import type { Database } from 'sqlite3';
import { readOnReaderConnections } from './read-connections';
import { POOL_BUSY_WAIT_MS, queueWrites } from './write-queue';

/**
 * Opens the SQLite database that server and worker processes share (DESIGN §4):
 * WAL so readers never wait for the writer, foreign keys on, a short busy_timeout on every connection,
 * IMMEDIATE transactions so a writer takes the write lock up front instead of failing on upgrade, and writes
 * that take turns in the process and wait for other processes on timers (write-queue.ts), and plain reads spread
 * over connections of their own (read-connections.ts).
 */
export async function openSqliteDatabase(file: string): Promise<Sequelize> {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    storage: file,
    logging: false,
    transactionType: Transaction.TYPES.IMMEDIATE,
    define: { underscored: false, freezeTableName: false },
  });
  configureEveryConnection(sequelize);
  queueWrites(sequelize);
  readOnReaderConnections(sequelize);
  await sequelize.query('PRAGMA journal_mode = WAL');
  await sequelize.query('PRAGMA synchronous = NORMAL');
  return sequelize;
}

/**
 * Sequelize's SQLite dialect opens a fresh connection for every transaction and runs no connect hooks,
 * so the busy timeout is set here, on each connection the first time it is handed out.
 */
function configureEveryConnection(sequelize: Sequelize): void {
  const manager = sequelize.connectionManager as unknown as {
    getConnection: (options?: object) => Promise<Database>;
  };
  const configured = new WeakSet<Database>();
  const getConnection = manager.getConnection.bind(manager);
  manager.getConnection = async (options) => {
    const connection = await getConnection(options);
    if (!configured.has(connection)) {
      connection.configure('busyTimeout', POOL_BUSY_WAIT_MS);
      configured.add(connection);
    }
    return connection;
  };
}
