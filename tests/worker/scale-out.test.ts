import type { ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Op } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PairsetManifest } from '../../shared/types/pairsets';
import { AuditEvent, Clip, Job, MotionField } from '../../server/core/models';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { createObjectStore } from '../../server/core/storage/open-store';
import { frameName, objectKeys } from '../../server/core/storage/paths';
import { binary } from '../helpers/binary-body';
import { makeTestClip } from '../helpers/media-fixtures';
import { addProject } from '../helpers/pipeline-clips';
import { pairsetDefinition } from '../helpers/pairset-build';
import { startS3Fake, type S3Fake } from '../helpers/s3-fake';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { exited, workerProcesses } from '../helpers/worker-processes';

/**
 * Many machines on one: the server and three worker processes over an S3-compatible bucket (s3rver), each worker
 * with a scratch folder of its own and, on PostgreSQL, a storage folder of its own too, so nothing but the database
 * and the bucket is shared. One worker is killed with SIGKILL in the middle of a stage and started again. Every
 * clip must end processed exactly once, with exactly the objects its rows name, and a pairset built from the
 * bucket must download by byte ranges and match the SHA-256 sums of its manifest.
 */

const CLIPS = 12;
const WORKERS = 3;
const LEASE_S = 2;
const KILL_IN_STAGES = ['signals', 'motion'];
const WAIT_MS = 240_000;

let fake: S3Fake;
let server: TestServer;
let store: ObjectStore;
let workers: ReturnType<typeof workerProcesses>;
let operator: Awaited<ReturnType<typeof signedInAgent>>;
let curator: Awaited<ReturnType<typeof signedInAgent>>;
let engineer: Awaited<ReturnType<typeof signedInAgent>>;
let projectId: number;
const machines = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-machines-'));
const running: ChildProcess[] = [];

beforeAll(async () => {
  fake = await startS3Fake();
  Object.assign(process.env, fake.env);
  const s3 = { objectStore: `s3://${fake.bucket}/campaign`, s3Endpoint: fake.endpoint, s3Region: 'us-east-1' };
  server = await startTestServer(s3);
  store = createObjectStore({ ...s3, storageDir: server.storageDir });
  workers = workerProcesses(server, LEASE_S, WAIT_MS);
  const admin = await addUser(server, 'admin');
  await addUser(server, 'operator');
  await addUser(server, 'curator');
  await addUser(server, 'engineer');
  operator = await signedInAgent(server, 'operator@example.test');
  curator = await signedInAgent(server, 'curator@example.test');
  engineer = await signedInAgent(server, 'engineer@example.test');
  projectId = (await addProject(admin.id, 'Ridge transects', { sampleFps: 5, workingSize: 160 })).id;
}, 120_000);
afterAll(async () => {
  for (const child of running) child.kill('SIGKILL');
  await Promise.all(running.map(exited));
  await server.close();
  await fake.close();
  fs.rmSync(machines, { recursive: true, force: true });
});

/** Worker `n`'s own folders, as on a machine of its own; SQLite can only be shared through the server's folder. */
function machineEnv(n: number): NodeJS.ProcessEnv {
  const own = path.join(machines, `machine-${n}`);
  return {
    ...fake.env,
    KINEFOLD_OBJECT_STORE: server.config.objectStore!,
    KINEFOLD_SCRATCH_DIR: path.join(own, 'scratch'),
    KINEFOLD_STORAGE_DIR: server.config.databaseUrl ? path.join(own, 'storage') : server.storageDir,
  };
}

function startWorker(n: number): ChildProcess {
  const child = workers.start(machineEnv(n));
  running[n] = child;
  return child;
}

async function uploadClip(n: number): Promise<number> {
  const file = await makeTestClip(machines, `transect-${n}.mp4`, { seed: n });
  const { body } = await operator.agent
    .post('/api/clips')
    .set('x-csrf-token', operator.csrf)
    .field('projectId', String(projectId))
    .attach('file', file)
    .expect(201);
  return body.id as number;
}

describe('three workers, three scratch folders, one bucket', () => {
  let clipIds: number[];

  it(`processes ${CLIPS} clips exactly once with a worker killed mid-stage`, async () => {
    clipIds = [];
    for (let n = 0; n < CLIPS; n += 1) clipIds.push(await uploadClip(n));
    for (let n = 0; n < WORKERS; n += 1) startWorker(n);

    const victim = running[0]!;
    const job = await workers.until(() =>
      Job.findOne({
        where: {
          kind: 'process-clip',
          state: 'running',
          stage: { [Op.in]: KILL_IN_STAGES },
          leaseOwner: { [Op.like]: `%:${victim.pid}:%` },
        },
      }),
    );
    victim.kill('SIGKILL');
    await exited(victim);
    // Killed holding the job: the clip's stage neither committed nor released.
    expect((await job.reload()).state).toBe('running');
    startWorker(0);

    await workers.until(async () => (await Job.count({ where: { kind: 'process-clip', state: 'done' } })) === CLIPS);
    expect(await Job.count({ where: { kind: 'process-clip', state: { [Op.ne]: 'done' } } })).toBe(0);
    for (const clipId of clipIds) {
      const clip = (await Clip.findByPk(clipId))!;
      expect(clip.state).toBe('awaiting_review');
      const processed = await AuditEvent.count({ where: { action: 'clip.processed', targetId: String(clipId) } });
      expect(processed).toBe(1);
    }
    // The killed worker's job was taken over after its lease and finished by another worker.
    expect((await job.reload()).state).toBe('done');
  }, 600_000);

  it('leaves in the bucket exactly the objects each clip names, and nothing on the workers', async () => {
    for (const clipId of clipIds) {
      const clip = (await Clip.findByPk(clipId))!;
      const fields = await MotionField.findAll({ where: { clipId, direction: 'forward' }, attributes: ['fromIndex'] });
      const layout = objectKeys.clipDerived(clipId);
      const expected = [
        objectKeys.clipSource(clipId, clip.sourceExt),
        layout.preview,
        layout.thumbnail,
        ...Array.from({ length: clip.frameCount! }, (_, index) => layout.frame(index)),
        ...fields.map((field) => layout.motionField(field.fromIndex)),
      ].sort();
      const stored = (await store.list(objectKeys.clipDir(clipId))).map((object) => object.key);
      expect(stored).toEqual(expected);
      expect(fields.length).toBeGreaterThan(0);
      expect(layout.frame(0)).toContain(`${frameName(0)}.webp`);
    }
    // Each machine's scratch folder holds no clip any more; the killed worker's folder went when it came back.
    for (let n = 0; n < WORKERS; n += 1) {
      const scratch = path.join(machines, `machine-${n}`, 'scratch');
      const folders = fs.readdirSync(scratch);
      expect(folders).toEqual([`worker-${running[n]!.pid}`]);
      const copies = path.join(scratch, folders[0]!, 'clips');
      expect(fs.existsSync(copies) ? fs.readdirSync(copies) : []).toEqual([]);
    }
    expect(fs.existsSync(path.join(server.storageDir, 'clips'))).toBe(false);
  });

  it('builds a pairset from the bucket whose shards download by range and match their SHA-256', async () => {
    await curator.agent
      .post('/api/review/bulk')
      .set('x-csrf-token', curator.csrf)
      .send({ clipIds, decision: 'accept' })
      .expect(200);
    const definition = pairsetDefinition({ projectIds: [projectId], views: ['frame', 'motion'], shardMB: 1 });
    const created = await engineer.agent
      .post('/api/pairsets')
      .set('x-csrf-token', engineer.csrf)
      .send(definition)
      .expect(201);
    const pairsetId = created.body.id as number;
    await engineer.agent.post(`/api/pairsets/${pairsetId}/build`).set('x-csrf-token', engineer.csrf).expect(202);
    await workers.until(async () => {
      const { body } = await engineer.agent.get(`/api/pairsets/${pairsetId}`).expect(200);
      if (body.state === 'failed') throw new Error(`the build failed: ${body.error}`);
      return body.state === 'built';
    });

    const manifest = (await engineer.agent.get(`/api/pairsets/${pairsetId}/manifest`).expect(200))
      .body as PairsetManifest;
    expect(manifest.shards.length).toBeGreaterThan(1);
    for (const shard of manifest.shards) {
      const url = `/api/pairsets/${pairsetId}/shards/${shard.index}`;
      const half = Math.floor(shard.bytes / 2);
      const first = await engineer.agent
        .get(url)
        .set('Range', `bytes=0-${half - 1}`)
        .buffer(true)
        .parse(binary)
        .expect(206);
      const rest = await engineer.agent.get(url).set('Range', `bytes=${half}-`).buffer(true).parse(binary).expect(206);
      expect(rest.headers['content-range']).toBe(`bytes ${half}-${shard.bytes - 1}/${shard.bytes}`);
      const whole = Buffer.concat([first.body as Buffer, rest.body as Buffer]);
      expect(whole.length).toBe(shard.bytes);
      expect(createHash('sha256').update(whole).digest('hex')).toBe(shard.sha256);
    }
    const keys = (await store.list(objectKeys.pairsetDir(pairsetId))).map((object) => object.key);
    expect(keys).toHaveLength(manifest.shards.length + 1);
  }, 300_000);
});
