import { execFile } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeEach, describe, expect, it } from 'vitest';

const run = promisify(execFile);
const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-cli-reset-'));
const KINEFOLD_FILES = [
  'db/kinefold.sqlite',
  'incoming/upload-1.part',
  'clips/3/source.mp4',
  'pairsets/1/pairset.json',
];
const OTHER_FILE = 'notes-kept-by-someone.txt';

/** Runs `npm run demo:reset` exactly as a person would, with PORT pointing where the test says. */
async function demoReset(port: number): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('npm', ['run', '--silent', 'demo:reset'], {
      env: { ...process.env, KINEFOLD_STORAGE_DIR: storageDir, PORT: String(port) },
    });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failed = error as { code: number; stdout: string; stderr: string };
    return { code: failed.code, stdout: failed.stdout, stderr: failed.stderr };
  }
}

const exists = (file: string) => fs.existsSync(path.join(storageDir, file));

/** A stand-in for a running server: answers GET /api/health as Kinefold's does. */
async function healthServer(): Promise<http.Server> {
  const server = http.createServer((_req, res) => {
    res.setHeader('content-type', 'application/json');
    res.end(JSON.stringify({ status: 'ok', database: 'reachable', version: 'test' }));
  });
  await new Promise<void>((done) => server.listen(0, '127.0.0.1', done));
  return server;
}

/** A port nothing listens on: one the system just gave out and took back. */
async function freePort(): Promise<number> {
  const server = http.createServer();
  await new Promise<void>((done) => server.listen(0, '127.0.0.1', done));
  const { port } = server.address() as AddressInfo;
  await new Promise((done) => server.close(done));
  return port;
}

beforeEach(() => {
  for (const file of [...KINEFOLD_FILES, OTHER_FILE]) {
    fs.mkdirSync(path.dirname(path.join(storageDir, file)), { recursive: true });
    fs.writeFileSync(path.join(storageDir, file), 'x');
  }
});
afterAll(() => fs.rmSync(storageDir, { recursive: true, force: true }));

describe('npm run demo:reset', () => {
  it('refuses while Kinefold answers on its port, and removes nothing', async () => {
    const server = await healthServer();
    try {
      const result = await demoReset((server.address() as AddressInfo).port);
      expect(result.code).toBe(1);
      expect(result.stderr).toMatch(/Kinefold is running on port \d+; stop it .*Nothing was removed/);
      for (const file of KINEFOLD_FILES) expect(exists(file)).toBe(true);
    } finally {
      await new Promise((done) => server.close(done));
    }
  });

  it('empties the database and stored files when Kinefold is stopped, leaving other files alone', async () => {
    const result = await demoReset(await freePort());
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/emptied .*Run npm start to begin again/);
    for (const file of KINEFOLD_FILES) expect(exists(file)).toBe(false);
    expect(exists(OTHER_FILE)).toBe(true);
  });
});
