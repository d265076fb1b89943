import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freshPostgresDatabase, type TestDatabase } from '../helpers/test-database';

/**
 * sslmode reaches the `pg` driver (db/postgres-tls.ts maps it; tests/unit/postgres-tls.test.ts checks the mapping):
 * against the local test server, `npm run prepare-db` connects or is refused as that server's TLS setting says.
 */
const run = promisify(execFile);
const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-dbtls-'));
let database: TestDatabase & { url: string };
let serverHasTls: boolean;

beforeAll(async () => {
  database = await freshPostgresDatabase();
  const client = new pg.Client({ connectionString: database.url });
  await client.connect();
  serverHasTls = (await client.query('SHOW ssl')).rows[0].ssl === 'on';
  await client.end();
});
afterAll(async () => {
  await database.drop();
  fs.rmSync(storageDir, { recursive: true, force: true });
});

async function prepare(query: string): Promise<{ code: number; stderr: string }> {
  try {
    await run(process.execPath, ['--import', 'tsx', 'server/cli/prepare.ts'], {
      env: {
        ...process.env,
        KINEFOLD_STORAGE_DIR: storageDir,
        KINEFOLD_DATABASE_URL: database.url + query,
        KINEFOLD_DEMO: 'off',
      },
      timeout: 60_000,
    });
    return { code: 0, stderr: '' };
  } catch (error) {
    return error as { code: number; stderr: string };
  }
}

describe('sslmode against the local PostgreSQL server', () => {
  it('disable connects without TLS', async () => {
    expect((await prepare('?sslmode=disable')).code).toBe(0);
  });

  it('require asks for TLS: refused in one line by a server without it, accepted by one with it', async () => {
    const { code, stderr } = await prepare('?sslmode=require');
    if (serverHasTls) {
      expect(code).toBe(0);
    } else {
      expect(code).toBe(1);
      expect(stderr.trim().split('\n')).toEqual([
        expect.stringMatching(/KINEFOLD_DATABASE_URL: .*does not support SSL/),
      ]);
    }
  });

  it('prefer is refused before connecting, in one line naming the variable', async () => {
    const { code, stderr } = await prepare('?sslmode=prefer');
    expect(code).toBe(1);
    expect(stderr.trim()).toMatch(/^Kinefold: KINEFOLD_DATABASE_URL: sslmode=prefer may fall back/);
  });
});
