import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import type { TestServer } from './test-server';

const REPO = path.resolve(import.meta.dirname, '../..');

/**
 * Real worker processes (`node --import tsx worker/index.ts`, as `npm run worker` starts them) on a test server's
 * storage and database, with a short lease so a killed one's job is taken over quickly; their output is kept for
 * the message of a wait that gives up.
 */
export function workerProcesses(server: TestServer, leaseS: number, waitMs = 30_000) {
  const output: string[] = [];
  return {
    output,
    /** Starts one more worker; `env` adds to or overrides the server's settings (its own scratch folder, say). */
    start(env: NodeJS.ProcessEnv = {}): ChildProcess {
      const child = spawn(process.execPath, ['--import', 'tsx', 'worker/index.ts'], {
        cwd: REPO,
        env: { ...process.env, ...server.env, KINEFOLD_JOB_LEASE_S: String(leaseS), ...env },
        stdio: ['ignore', 'pipe', 'pipe'],
      });
      child.stdout!.on('data', (chunk: Buffer) => output.push(chunk.toString()));
      child.stderr!.on('data', (chunk: Buffer) => output.push(chunk.toString()));
      return child;
    },
    /** Polls `find` until it gives something, or fails after `timeoutMs` showing what the workers printed. */
    async until<T>(find: () => Promise<T | null | undefined | false>, timeoutMs = waitMs): Promise<T> {
      const deadline = Date.now() + timeoutMs;
      for (;;) {
        const found = await find();
        if (found) return found;
        if (Date.now() > deadline) throw new Error(`gave up waiting; worker output:\n${output.join('')}`);
        await new Promise((done) => setTimeout(done, 25));
      }
    },
  };
}

/** Resolves with the exit code once the process has ended (at once if it has). */
export function exited(child: ChildProcess): Promise<number | null> {
  return child.exitCode !== null || child.signalCode !== null
    ? Promise.resolve(child.exitCode)
    : new Promise((done) => child.once('exit', (code) => done(code)));
}
