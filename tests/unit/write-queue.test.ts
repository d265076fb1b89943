import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSqliteDatabase as openDatabase } from '../../server/core/db/sqlite-connection';
import { POOL_BUSY_WAIT_MS } from '../../server/core/db/write-queue';

/**
 * Two Sequelize instances on one SQLite file stand for two processes (server and worker): each has its own write
 * queue, so between them only SQLite's lock decides, as between processes.
 */
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-write-queue-'));
let server: Sequelize;
let worker: Sequelize;

beforeAll(async () => {
  server = await openDatabase(path.join(dir, 'shared.sqlite'));
  worker = await openDatabase(path.join(dir, 'shared.sqlite'));
  await server.query('CREATE TABLE marks (id INTEGER PRIMARY KEY, who TEXT NOT NULL)');
});
afterAll(async () => {
  await server.close();
  await worker.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const pause = (ms: number) => new Promise((done) => setTimeout(done, ms));

describe('writes that contend', () => {
  it('queue inside one process: 40 transactions and 40 lone writes at once all land', async () => {
    const transactions = Array.from({ length: 40 }, (_, n) =>
      server.transaction(async (transaction) => {
        await server.query('INSERT INTO marks (who) VALUES (:who)', { replacements: { who: `t${n}` }, transaction });
        await pause(2);
      }),
    );
    const lone = Array.from({ length: 40 }, (_, n) =>
      server.query('INSERT INTO marks (who) VALUES (:who)', { replacements: { who: `w${n}` } }),
    );
    await Promise.all([...transactions, ...lone]);
    const [rows] = await server.query("SELECT COUNT(*) AS n FROM marks WHERE who GLOB '[tw]*'");
    expect((rows as { n: number }[])[0]!.n).toBe(80);
  });

  it('wait on timers for another process holding the lock far longer than the busy handler waits', async () => {
    const holdMs = 40 * POOL_BUSY_WAIT_MS;
    let released = 0;
    const holder = worker.transaction(async (transaction) => {
      await worker.query("INSERT INTO marks (who) VALUES ('worker')", { transaction });
      await pause(holdMs);
      released = Date.now();
    });
    await pause(POOL_BUSY_WAIT_MS * 2);
    const waiter = server.transaction(async (transaction) => {
      await server.query("INSERT INTO marks (who) VALUES ('server')", { transaction });
      return Date.now();
    });
    const lone = server.query("INSERT INTO marks (who) VALUES ('server-lone')").then(() => Date.now());
    const [, wrote, wroteLone] = await Promise.all([holder, waiter, lone]);
    expect(wrote).toBeGreaterThanOrEqual(released);
    expect(wroteLone).toBeGreaterThanOrEqual(released);
  });
});
