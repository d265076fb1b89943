import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Job, MailOutbox } from '../../server/core/models';
import { claimJob, finishJob, renewLease } from '../../server/core/jobs/claim';
import type { Handlers } from '../../worker/jobs/handler';
import { HANDLERS } from '../../worker/jobs/handlers';
import { RETRY_POLICIES } from '../../worker/jobs/retry-policy';
import { addProject, damageSecondPart, insertClip, makePatternClip, workFolders } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let worker: TestRuntime;
let operator: { id: number; email: string };
let projectId: number;
let cleanFile: string;
let damagedFile: string;

beforeAll(async () => {
  server = await startTestServer();
  worker = startTestRuntime(server);
  const admin = await addUser(server, 'admin');
  operator = await addUser(server, 'operator');
  projectId = (await addProject(admin.id, 'runtime')).id;
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  cleanFile = await makePatternClip(path.join(gen, 'clean.mp4'), 3);
  // Its index says 4 s, but from the middle of the file on the bytes are zeros: it probes, then stops decoding.
  damagedFile = damageSecondPart(await makePatternClip(path.join(gen, 'whole.mp4'), 4), path.join(gen, 'damaged.mp4'));
});
afterAll(async () => {
  await worker.close();
  await server.close();
});

/** A copy of the clean clip with other bytes, so each test gets a clip of its own in the one project. */
let copies = 0;
async function newClip(file = cleanFile) {
  copies += 1;
  const copy = path.join(path.dirname(file), `copy-${copies}-${path.basename(file)}`);
  fs.copyFileSync(file, copy);
  fs.appendFileSync(copy, Buffer.from([copies % 256]));
  return insertClip(server, copy, projectId, operator.id);
}

async function untilTrue(check: () => Promise<boolean>, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error('condition not reached in time');
    await new Promise((done) => setTimeout(done, 25));
  }
}

describe('claiming', () => {
  it('gives each due job to one claimer only, oldest first', async () => {
    const jobs = await Promise.all(
      [1, 2, 3].map(() =>
        Job.create({
          kind: 'process-clip',
          clipId: null,
          payload: { clipId: 0 },
          state: 'queued',
          runAfter: new Date(Date.now() - 1000),
        }),
      ),
    );
    const claims = await Promise.all(Array.from({ length: 6 }, (_, i) => claimJob(`claimer-${i}`, 60_000)));
    const claimed = claims
      .filter((job) => job !== null)
      .map((job) => job!.id)
      .sort((a, b) => a - b);
    // Created at once, the jobs' ids need not follow the array's order (on PostgreSQL they do not).
    expect(claimed).toEqual(jobs.map((job) => job.id).sort((a, b) => a - b));
    await Job.destroy({ where: { id: claimed } });
  });

  it('takes over a job whose lease ran out and counts the attempt; the old holder can no longer write', async () => {
    const job = await Job.create({
      kind: 'process-clip',
      clipId: null,
      payload: { clipId: 0 },
      state: 'queued',
      runAfter: new Date(Date.now() - 1000),
    });
    expect((await claimJob('first', 1))!.id).toBe(job.id);
    await new Promise((done) => setTimeout(done, 10));
    const again = await claimJob('second', 60_000);
    expect(again).toMatchObject({ id: job.id, leaseOwner: 'second', attempts: 2 });
    expect(await renewLease({ jobId: job.id, owner: 'first' }, 60_000)).toBe(false);
    expect(await finishJob({ jobId: job.id, owner: 'first' })).toBe(false);
    expect(await finishJob({ jobId: job.id, owner: 'second' })).toBe(true);
    await job.destroy();
  });
});

describe('failures', () => {
  it('retries a failure that may pass after the backoff of its kind, then fails it for good once', async () => {
    const recorded: string[] = [];
    const handlers: Handlers = {
      ...HANDLERS,
      'process-clip': {
        run: async () => {
          throw new Error('the disk is full');
        },
        recordFailure: async (_claimed, failure) => {
          recorded.push(`${failure.final}: ${failure.message}`);
        },
      },
    };
    const failing = startTestRuntime(server, { handlers, owner: 'failing-worker' });
    const policy = RETRY_POLICIES['process-clip'];
    const job = await Job.create({
      kind: 'process-clip',
      clipId: null,
      payload: { clipId: 0 },
      state: 'queued',
      runAfter: new Date(Date.now() - 1000),
    });
    try {
      for (let attempt = 1; attempt < policy.maxAttempts; attempt += 1) {
        const before = Date.now();
        expect(await failing.runtime.runOnce()).toBe(true);
        await job.reload();
        expect(job).toMatchObject({ state: 'queued', attempts: attempt, error: 'the disk is full', leaseOwner: null });
        const waitS = policy.backoffS[Math.min(attempt - 1, policy.backoffS.length - 1)]!;
        expect(job.runAfter.getTime()).toBeGreaterThanOrEqual(before + waitS * 1000);
        expect(await failing.runtime.runOnce()).toBe(false);
        await job.update({ runAfter: new Date(Date.now() - 1000) });
      }
      await failing.runtime.runOnce();
      await job.reload();
      expect(job).toMatchObject({ state: 'failed', attempts: policy.maxAttempts });
      expect(recorded).toEqual(['false: the disk is full']);
    } finally {
      await failing.close();
      await job.destroy();
    }
  });

  it(
    'fails a damaged clip at once with its stage and a plain message, mails the uploader once, ' +
      'and goes on to the next job',
    async () => {
      const damaged = await newClip(damagedFile);
      const next = await newClip();
      const loop = worker.runtime.run();
      try {
        await untilTrue(async () => (await next.clip.reload()).state === 'awaiting_review');
      } finally {
        await worker.runtime.stop();
        await loop;
      }
      await damaged.clip.reload();
      await damaged.job.reload();
      expect(damaged.job).toMatchObject({ state: 'failed', attempts: 1 });
      expect(damaged.clip).toMatchObject({ state: 'failed', stage: 'sample' });
      expect(damaged.clip.error).toMatch(/^Only the first [\d.]+ s of 4\.0 s could be decoded .*damaged/);
      const events = await AuditEvent.findAll({
        where: { targetId: String(damaged.clip.id), action: 'clip.processing_failed' },
      });
      expect(events).toHaveLength(1);
      expect(events[0]!.detail).toMatchObject({ stage: 'sample', message: damaged.clip.error });
      const mails = await MailOutbox.findAll({ where: { to: operator.email, template: 'clip-failed' } });
      expect(mails).toHaveLength(1);
      expect(mails[0]!.text).toContain(damaged.clip.error!);
      expect(workFolders(server, damaged.clip.id)).toEqual([]);
    },
  );

  it('fails a job that was claimed more often than its kind allows (its worker kept dying)', async () => {
    const { clip, job } = await newClip();
    await job.update({ attempts: RETRY_POLICIES['process-clip'].maxClaims });
    await worker.runtime.runOnce();
    await clip.reload();
    expect(await job.reload()).toMatchObject({ state: 'failed' });
    expect(clip.state).toBe('failed');
    expect(clip.error).toMatch(/stopped \d+ times/);
  });
});

describe('stopping', () => {
  it('gives the job in hand back to the queue untouched, and a later run finishes it', async () => {
    const { clip, job } = await newClip();
    const loop = worker.runtime.run();
    await untilTrue(async () => (await Clip.findByPk(clip.id))?.stage === 'signals');
    await worker.runtime.stop();
    await loop;
    await job.reload();
    expect(job).toMatchObject({ state: 'queued', attempts: 0, leaseOwner: null });
    expect(workFolders(server, clip.id)).toEqual([]);
    await worker.drain();
    expect(await job.reload()).toMatchObject({ state: 'done', attempts: 1 });
    expect(await clip.reload()).toMatchObject({ state: 'awaiting_review' });
  });
});
