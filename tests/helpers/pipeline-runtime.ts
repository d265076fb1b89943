import fs from 'node:fs';
import path from 'node:path';
import { createObjectStore } from '../../server/core/storage/open-store';
import type { Handlers } from '../../worker/jobs/handler';
import { createFramePool, type FramePool } from '../../worker/pool/frame-pool';
import { createJobRuntime, type JobRuntime } from '../../worker/runtime/job-runtime';
import { workerStorage } from '../../worker/storage/worker-storage';
import { addUser, startTestServer, type TestServer } from './test-server';

export interface TestRuntime {
  runtime: JobRuntime;
  pool: FramePool;
  /** Runs due jobs one after another until none is left. */
  drain(): Promise<number>;
  close(): Promise<void>;
}

/** The worker's real job runtime and frame pool, in the test process, over a test server's database and storage. */
export function startTestRuntime(
  server: TestServer,
  { handlers, owner = 'test-worker' }: { handlers?: Handlers; owner?: string } = {},
): TestRuntime {
  const pool = createFramePool();
  const runtime = createJobRuntime({
    config: server.config,
    storage: workerStorage(server.config, createObjectStore(server.config)),
    pool,
    owner,
    handlers,
    pollMs: 50,
  });
  return {
    runtime,
    pool,
    async drain() {
      let ran = 0;
      while (await runtime.runOnce()) ran += 1;
      return ran;
    },
    close: () => pool.destroy(),
  };
}

/** A test server, the worker runtime over it, an admin and a folder for generated footage: a pipeline test's bed. */
export interface PipelineBed {
  server: TestServer;
  worker: TestRuntime;
  adminId: number;
  /** `<storage>/generated`, for footage the test renders. */
  gen: string;
}

export async function startPipelineBed(): Promise<PipelineBed> {
  const server = await startTestServer();
  const worker = startTestRuntime(server);
  const adminId = (await addUser(server, 'admin')).id;
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  return { server, worker, adminId, gen };
}

export async function closePipelineBed({ server, worker }: Pick<PipelineBed, 'server' | 'worker'>): Promise<void> {
  await worker.close();
  await server.close();
}
