import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';

const run = promisify(execFile);
const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-cli-'));

/** Runs `npm run user:add` exactly as a person would, against a fresh storage folder. */
async function userAdd(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('npm', ['run', '--silent', 'user:add', '--', ...args], {
      env: { ...process.env, KINEFOLD_STORAGE_DIR: storageDir, KINEFOLD_BCRYPT_COST: '10' },
    });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failed = error as { code: number; stdout: string; stderr: string };
    return { code: failed.code, stdout: failed.stdout, stderr: failed.stderr };
  }
}

afterAll(() => fs.rmSync(storageDir, { recursive: true, force: true }));

describe('npm run user:add', () => {
  it('creates a user', async () => {
    const result = await userAdd(
      '--email',
      'field@example.test',
      '--role',
      'operator',
      '--password',
      'a-long-field-phrase',
      '--name',
      'Field Person',
    );
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/created operator field@example\.test/);
  });

  it('refuses a duplicate with a clear message', async () => {
    const result = await userAdd(
      '--email',
      'FIELD@example.test',
      '--role',
      'curator',
      '--password',
      'another-long-phrase',
    );
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/already exists/);
  });

  it('refuses a weak password and says what is wrong', async () => {
    const short = await userAdd('--email', 'short@example.test', '--role', 'curator', '--password', 'short');
    expect(short.code).toBe(1);
    expect(short.stderr).toMatch(/at least 12 characters/);
    const common = await userAdd('--email', 'common@example.test', '--role', 'curator', '--password', 'password1234');
    expect(common.code).toBe(1);
    expect(common.stderr).toMatch(/too common/);
  });

  it('refuses an unknown role and missing options', async () => {
    const role = await userAdd('--email', 'x@example.test', '--role', 'boss', '--password', 'a-long-field-phrase');
    expect(role.stderr).toMatch(/role must be one of operator, curator, engineer, admin/);
    const missing = await userAdd('--email', 'x@example.test');
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/required/);
  });
});
