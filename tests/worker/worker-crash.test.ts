import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Op } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Frame, Job, MotionField } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { addProject, insertClip, makePatternClip, workFolders } from '../helpers/pipeline-clips';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';
import { exited, workerProcesses } from '../helpers/worker-processes';

/**
 * A real worker process (`node --import tsx worker/index.ts`, as `npm run worker` starts it) is killed with SIGKILL
 * at random moments while it processes a clip, and started again each time. With a 2 s lease the next process takes
 * the job over; each kill must cost at most the stage in hand, never doubled rows or leftover work folders.
 * Kill k waits until the job has reached stage k mod 5 (or a later one) and then a random time, so every stage,
 * its commit included, gets its share of kills.
 */

const KILLS = 10;
const LEASE_S = 2;
const STAGES = ['sample', 'signals', 'motion', 'flags'];
const MAX_DELAY_IN_STAGE_MS = 600;
const CLIP_S = 5;

let server: TestServer;
let workers: ReturnType<typeof workerProcesses>;
let adminId: number;
let projectId: number;
let source: string;

beforeAll(async () => {
  server = await startTestServer();
  workers = workerProcesses(server, LEASE_S);
  adminId = (await addUser(server, 'admin')).id;
  projectId = (await addProject(adminId, 'crashes')).id;
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  source = await makePatternClip(path.join(gen, 'clip.mp4'), CLIP_S);
});
afterAll(() => server.close());

/** The CPU niceness of a process's main thread, field 19 of /proc/<pid>/stat (proc(5)). */
function niceOf(pid: number): number {
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[16]);
}

/** Each clip is a copy of the source with other bytes, so the project takes it as a new upload. */
async function addClip(n: number): Promise<Clip> {
  const copy = path.join(path.dirname(source), `clip-${n}.mp4`);
  fs.writeFileSync(copy, Buffer.concat([fs.readFileSync(source), Buffer.from([n])]));
  return (await insertClip(server, copy, projectId, adminId)).clip;
}

describe('a worker killed at random moments', () => {
  it(`loses and doubles nothing over ${KILLS} kills mid-processing`, async () => {
    const clips = [await addClip(0)];
    const killedIn: string[] = [];
    for (let attempt = 0; killedIn.length < KILLS; attempt += 1) {
      const target = STAGES.indexOf(STAGES[attempt % STAGES.length]!);
      const child = workers.start();
      const job = await workers.until(() =>
        Job.findOne({
          where: { state: 'running', leaseOwner: { [Op.like]: `%:${child.pid}:%` } },
        }),
      );
      await workers.until(
        async () => (await job.reload()).state !== 'running' || STAGES.indexOf(job.stage ?? '') >= target,
      );
      await new Promise((done) => setTimeout(done, Math.random() * MAX_DELAY_IN_STAGE_MS));
      child.kill('SIGKILL');
      await exited(child);
      await job.reload();
      // Killed while still holding the job (mid-processing), or only after it had finished it.
      if (job.state === 'running') killedIn.push(`${job.stage} ${Math.round(job.progress * 100)}%`);
      if (job.state === 'done') clips.push(await addClip(clips.length));
    }
    console.log(`killed ${KILLS} times mid-processing, in: ${killedIn.join(', ')}; clips: ${clips.length}`);

    const last = workers.start();
    await workers.until(
      async () => (await Clip.count({ where: { projectId, state: 'awaiting_review' } })) === clips.length,
      60_000,
    );
    // KINEFOLD_WORKER_NICE's default (or the test's own niceness, if higher): the heavy work yields to the server.
    expect(niceOf(last.pid!)).toBe(Math.max(10, os.getPriority()));
    last.kill('SIGTERM');
    expect(await exited(last)).toBe(0);

    const paths = storagePaths(server.storageDir);
    for (const clip of clips) {
      await clip.reload();
      expect(clip).toMatchObject({ state: 'awaiting_review', stage: null, error: null, frameCount: CLIP_S * 5 });
      const indexes = (await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] })).map(
        (frame) => frame.index,
      );
      expect(indexes).toEqual([...Array(clip.frameCount).keys()]);
      const layout = paths.clipDerived(clip.id);
      expect(fs.readdirSync(layout.framesDir)).toHaveLength(clip.frameCount!);
      // The test pattern has no cut: a forward and a backward row per pair, one packed forward field per pair.
      expect(await MotionField.count({ where: { clipId: clip.id } })).toBe(2 * (clip.frameCount! - 1));
      expect(fs.readdirSync(layout.motionDir)).toHaveLength(clip.frameCount! - 1);
      expect(workFolders(server, clip.id)).toEqual([]);
      expect(await AuditEvent.count({ where: { targetId: String(clip.id), action: 'clip.processed' } })).toBe(1);
      expect(await Job.findOne({ where: { clipId: clip.id } })).toMatchObject({ state: 'done', leaseOwner: null });
    }
  }, 150_000);
});
