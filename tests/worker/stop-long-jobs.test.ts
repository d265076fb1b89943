import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { enqueueJob } from '../../server/core/jobs/enqueue';
import fs from 'node:fs';
import path from 'node:path';
import { Clip, Job, UsageSnapshot } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { createObjectStore } from '../../server/core/storage/open-store';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { ShutdownError } from '../../worker/jobs/job-errors';
import { reconcileUsage } from '../../worker/jobs/reconcile-usage';
import { workerStorage } from '../../worker/storage/worker-storage';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * The worker's long passes over every clip (compact-storage after an upgrade, the daily reconcile-usage) give
 * their job back promptly when the worker is told to stop, instead of finishing the pass first: on a large
 * installation that took longer than any process manager waits after SIGTERM.
 */

/** Enough clips that converting them all takes far longer than the wait allowed for a stop. */
const CLIPS = 1500;
const RECORDED_BYTES = 60_000;
/** Generous on a loaded 2-core machine; before the fix the stop waited for the whole pass. */
const STOP_WITHIN_MS = 3000;

let server: TestServer;
let worker: TestRuntime;
let adminId: number;

/** Clip rows in the original storage format without files, as an upgraded installation of imported rows has. */
async function addOriginalClips(count: number): Promise<void> {
  const projectId = (await addProject(adminId, `older clips ${Date.now()}`)).id;
  const rows = Array.from({ length: count }, (_, index) => ({
    projectId,
    uploaderId: adminId,
    originalName: `older-${index}.mp4`,
    sizeBytes: RECORDED_BYTES,
    storedBytes: RECORDED_BYTES,
    derivedFormat: 'original' as const,
    sha256: index.toString(16).padStart(64, '0'),
    sourceExt: 'mp4',
    state: 'awaiting_review' as const,
    container: 'mov,mp4,m4a,3gp,3g2,mj2',
    codec: 'h264',
    durationS: 1,
    fps: 5,
    width: 160,
    height: 96,
    rotation: 0,
    site: '',
    rig: '',
    capturedAt: null,
    tags: [],
    notes: '',
  }));
  await Clip.bulkCreate(rows);
}

beforeAll(async () => {
  server = await startTestServer();
  worker = startTestRuntime(server);
  adminId = (await addUser(server, 'admin')).id;
  await addOriginalClips(CLIPS);
});

afterAll(async () => {
  await worker.close();
  await server.close();
});

/**
 * Runs reconcile-usage on the test's storage, with `afterListing` run once the store has been listed (the pass's
 * first long step), as a stop or another job could land there.
 */
async function reconcileWith(afterListing: () => Promise<void>, signal: AbortSignal): Promise<void> {
  const storage = workerStorage(server.config, createObjectStore(server.config));
  const store: ObjectStore = {
    ...storage.store,
    list: async (prefix) => {
      const objects = await storage.store.list(prefix);
      await afterListing();
      return objects;
    },
  };
  const job = await Clip.sequelize!.transaction((transaction) =>
    enqueueJob('reconcile-usage', { reason: 'scheduled' }, { transaction }),
  );
  await reconcileUsage.run(
    { job, payload: { reason: 'scheduled' } },
    {
      ...storage,
      store,
      config: server.config,
      pool: worker.pool,
      lease: { jobId: job.id, owner: 'test-worker' },
      signal,
    },
  );
}

describe('a stopping worker', () => {
  it('gives back a compact-storage job between clips, and the next claim carries on', async () => {
    const job = await Clip.sequelize!.transaction((transaction) =>
      enqueueJob('compact-storage', { reason: 'upgrade' }, { transaction }),
    );
    const running = worker.runtime.run();
    for (;;) {
      await job.reload();
      if (job.progress > 0) break;
      await new Promise((done) => setTimeout(done, 20));
    }
    const begin = performance.now();
    await worker.runtime.stop();
    await running;
    expect(performance.now() - begin).toBeLessThan(STOP_WITHIN_MS);

    await job.reload();
    expect(job).toMatchObject({ state: 'queued', leaseOwner: null });
    const left = await Clip.count({ where: { derivedFormat: 'original' } });
    expect(left).toBeGreaterThan(0);
    expect(left).toBeLessThan(CLIPS);

    // Claimed again, it converts only what is left and finishes.
    await Job.update({ runAfter: new Date() }, { where: { id: job.id } });
    await worker.drain();
    expect(await job.reload()).toMatchObject({ state: 'done' });
    expect(await Clip.count({ where: { derivedFormat: 'original' } })).toBe(0);
  }, 120_000);

  it('stops reconcile-usage after its listing of the store, with nothing recorded', async () => {
    await Clip.update({ storedBytes: RECORDED_BYTES }, { where: {} });
    const controller = new AbortController();
    // The stop arrives while the store is listed, the pass's first long step.
    const run = reconcileWith(async () => controller.abort(new ShutdownError()), controller.signal);
    await expect(run).rejects.toBeInstanceOf(ShutdownError);
    expect(await UsageSnapshot.count()).toBe(0);
    // Every clip keeps the bytes recorded for it, though the store holds none of them.
    expect(await Clip.count({ where: { storedBytes: RECORDED_BYTES } })).toBe(await Clip.count());
  });
});

describe('reconcile-usage beside a job that records a clip size', () => {
  it('leaves a size recorded while it measured, instead of writing its older measurement over it', async () => {
    const [clip] = await Clip.findAll({ limit: 1, order: [['id', 'ASC']] });
    await clip!.update({ storedBytes: 500 });
    const file = path.join(storagePaths(server.storageDir).clipDir(clip!.id), 'frames', '000000.webp');
    fs.mkdirSync(path.dirname(file), { recursive: true });
    fs.writeFileSync(file, Buffer.alloc(1000));
    // Compaction finishes the clip just after the listing: smaller files, and their size recorded.
    await reconcileWith(async () => {
      fs.writeFileSync(file, Buffer.alloc(800));
      await Clip.update({ storedBytes: 800 }, { where: { id: clip!.id } });
    }, new AbortController().signal);
    expect(Number((await clip!.reload()).storedBytes)).toBe(800);
  });
});
