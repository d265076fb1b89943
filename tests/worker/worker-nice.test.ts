import fs from 'node:fs';
import os from 'node:os';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { exited, workerProcesses } from '../helpers/worker-processes';

/**
 * The worker lowers its CPU priority before its frame-thread pool, libuv's threads and ffmpeg children exist, so on
 * Linux (where niceness is per thread) every one of its threads runs at KINEFOLD_WORKER_NICE. Each thread's nice
 * value is field 19 of /proc/<pid>/task/<tid>/stat (proc(5)).
 */

let server: TestServer;
let workers: ReturnType<typeof workerProcesses>;

function threadNices(pid: number): number[] {
  return fs.readdirSync(`/proc/${pid}/task`).map((tid) => {
    const stat = fs.readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[16]);
  });
}

/** Starts a worker with the given niceness setting and returns its threads' nice values once it is ready. */
async function niceOfReadyWorker(setting: string): Promise<number[]> {
  const child = workers.start({ KINEFOLD_WORKER_NICE: setting });
  try {
    await workers.until(
      async () => workers.output.join('').includes(`:${child.pid}:`) && /ready/.test(workers.output.join('')),
    );
    return threadNices(child.pid!);
  } finally {
    child.kill('SIGTERM');
    expect(await exited(child)).toBe(0);
    workers.output.length = 0;
  }
}

beforeAll(async () => {
  server = await startTestServer();
  workers = workerProcesses(server, 60);
});

afterAll(async () => {
  await server.close();
});

describe('the worker process', () => {
  it('runs every thread at KINEFOLD_WORKER_NICE', async () => {
    const nices = await niceOfReadyWorker('7');
    // Main thread, libuv's pool, V8's helpers and the frame pool's first thread.
    expect(nices.length).toBeGreaterThan(4);
    // A test run already nicer than 7 stays so: a process may not raise its own priority.
    expect(new Set(nices)).toEqual(new Set([Math.max(7, os.getPriority())]));
  }, 60_000);

  it('keeps the niceness it was started with when the setting is 0', async () => {
    const nices = await niceOfReadyWorker('0');
    expect(new Set(nices)).toEqual(new Set([os.getPriority()]));
  }, 60_000);
});
