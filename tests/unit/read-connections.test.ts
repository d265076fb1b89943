import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { READ_CONNECTIONS } from '../../server/core/db/read-connections';
import { openSqliteDatabase } from '../../server/core/db/sqlite-connection';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-read-connections-'));
let db: Sequelize;

const openConnections = () =>
  Object.keys((db.connectionManager as unknown as { connections: Record<string, unknown> }).connections);

const names = async (options: { transaction?: Transaction } = {}) =>
  (await db.query<{ name: string }>('SELECT name FROM marks ORDER BY id', { type: QueryTypes.SELECT, ...options })).map(
    (row) => row.name,
  );

beforeAll(async () => {
  db = await openSqliteDatabase(path.join(dir, 'reads.sqlite'));
  await db.query('CREATE TABLE marks (id INTEGER PRIMARY KEY, name TEXT NOT NULL)');
});
afterAll(async () => {
  await db.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('plain reads on reader connections', () => {
  it('spread reads made at once over one reader per core', async () => {
    await Promise.all(Array.from({ length: 6 }, () => names()));
    const readers = openConnections().filter((key) => key.startsWith('reader-'));
    expect(readers.sort()).toEqual(Array.from({ length: READ_CONNECTIONS }, (_, n) => `reader-${n}`));
  });

  it('see a lone write as soon as it has settled', async () => {
    await db.query("INSERT INTO marks (name) VALUES ('first')");
    expect(await names()).toEqual(['first']);
  });

  it("leave a transaction's reads on its own connection, where its rows are visible before the commit", async () => {
    let inside: string[] = [];
    let outside: string[] = [];
    await db.transaction(async (transaction) => {
      await db.query("INSERT INTO marks (name) VALUES ('second')", { transaction });
      inside = await names({ transaction });
      outside = await names();
    });
    expect(inside).toEqual(['first', 'second']);
    expect(outside).toEqual(['first']);
    expect(await names()).toEqual(['first', 'second']);
  });
});
