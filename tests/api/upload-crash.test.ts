import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storagePaths } from '../../server/core/storage/paths';
import { startRunningApp, type RunningApp } from '../helpers/app-processes';
import { makeTestClip } from '../helpers/media-fixtures';
import { freshTestDatabase, type TestDatabase } from '../helpers/test-database';
import { paddedCopy, uploadBody } from '../helpers/upload-over-http';

/**
 * A real server process (`node --import tsx server/index.ts`) is killed with SIGKILL while an upload streams in,
 * then started again on the same storage folder. The project's quota has room for one such upload only, so the
 * killed upload's reservation, if it survived the restart, would refuse the same upload sent again.
 */

const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-crash-'));
const incoming = storagePaths(storageDir).incomingDir;
let app: RunningApp | undefined;
let file: string;
let database: TestDatabase;

beforeAll(async () => {
  database = await freshTestDatabase();
  const base = await makeTestClip(storageDir, 'base.mp4', { seconds: 1 });
  file = paddedCopy(base, path.join(storageDir, 'creek-04.mp4'), 4 * 1024 * 1024, 7);
}, 60_000);
afterAll(async () => {
  await app?.stop();
  await database.drop();
  fs.rmSync(storageDir, { recursive: true, force: true });
});

/** Sends the head and a third of the body, then waits until the server has begun the file in `incoming/`. */
async function halfUpload(baseUrl: string, session: { cookie: string; csrf: string }, projectId: number) {
  const { body, type } = uploadBody(projectId, file);
  const request = http.request(`${baseUrl}/api/clips`, {
    method: 'POST',
    headers: {
      cookie: session.cookie,
      'x-csrf-token': session.csrf,
      'content-type': type,
      'content-length': body.length,
    },
  });
  request.on('error', () => undefined);
  request.write(body.subarray(0, Math.floor(body.length / 3)));
  await expect
    .poll(() => fs.existsSync(incoming) && fs.readdirSync(incoming).length > 0, { timeout: 10_000 })
    .toBe(true);
  return request;
}

describe('a server killed mid-upload', () => {
  it('lets the same upload through at once after the restart, and leaves no partial file', async () => {
    app = await startRunningApp(storageDir, { databaseUrl: database.url });
    const admin = await app.signIn('admin');
    const requestBytes = uploadBody(0, file).body.length;
    const created = await app.api(admin, 'POST', '/api/projects', {
      name: 'Creek block',
      quotaBytes: Math.floor(requestBytes * 1.5),
    });
    expect(created.status).toBe(201);
    const projectId = ((await created.json()) as { id: number }).id;
    const operator = await app.signIn('operator');
    const cut = await halfUpload(app.baseUrl, operator, projectId);

    const killed = new Promise((done) => app!.server.once('exit', done));
    app.server.kill('SIGKILL');
    await killed;
    cut.destroy();
    expect(fs.readdirSync(incoming).length).toBeGreaterThan(0);

    app = await startRunningApp(storageDir, { databaseUrl: database.url });
    expect(fs.readdirSync(incoming)).toEqual([]);
    const again = await app.upload(await app.signIn('operator'), file, projectId);
    expect(again.status, again.body).toBe(201);
    expect(fs.readdirSync(incoming)).toEqual([]);
  }, 120_000);
});
