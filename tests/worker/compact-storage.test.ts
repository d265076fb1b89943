import fs from 'node:fs';
import path from 'node:path';
import { Op } from 'sequelize';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { viewImage } from '../../server/core/clips/clip-media';
import { readStoredField } from '../../server/core/media/stored-field';
import { Clip, Job, type User } from '../../server/core/models';
import { newPairsetVersion, startBuild, getPairsetDetail } from '../../server/core/pairsets/pairsets';
import { clipStoredUsage } from '../../server/core/storage/stored-usage';
import { storagePaths } from '../../server/core/storage/paths';
import type { PairsetDetail } from '../../shared/types/pairsets';
import { buildPairsetNow } from '../helpers/pairset-build';
import { addPairsetClip } from '../helpers/pairset-clips';
import { addProject, workFolders } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';
import { exited, workerProcesses } from '../helpers/worker-processes';
import { createFolderStore } from '../../server/core/storage/folder-store';

/**
 * An installation whose clips are stored in the original format (PNG frames, .flo fields both ways, stored views)
 * is converted by the compact-storage job, which the worker queues at start. Real worker processes are killed
 * with SIGKILL at random moments of the conversion and started again; afterwards every frame has the same pixels,
 * every field is within 1/128 px, nothing of the original format is left, and a pairset built before the
 * conversion comes out byte-identical when built again after it.
 */

const LEASE_S = 2;
const KILLS = 4;
const CLIPS = 8;
const MAX_DELAY_MS = 700;

let server: TestServer;
let workers: ReturnType<typeof workerProcesses>;
let runtime: TestRuntime;
let engineer: User;
let before: PairsetDetail;
const snapshot = new Map<number, { frames: Buffer[]; fields: Float32Array[] }>();
const paths = () => storagePaths(server.storageDir);

beforeAll(async () => {
  server = await startTestServer();
  workers = workerProcesses(server, LEASE_S, 60_000);
  runtime = startTestRuntime(server);
  const admin = await addUser(server, 'admin');
  engineer = await addUser(server, 'engineer');
  const projectId = (await addProject(admin.id, 'older clips')).id;
  for (let seed = 0; seed < CLIPS; seed += 1) {
    const clip = await addPairsetClip(server, {
      projectId,
      uploaderId: admin.id,
      frames: 24,
      width: 160,
      height: 96,
      shift: 1 + (seed % 3),
      seed,
      cutsBefore: seed === 2 ? [10] : [],
      format: 'original',
    });
    const layout = paths().clipDerived(clip.id, 'original');
    const frames = [];
    const fields = [];
    for (let index = 0; index < 24; index += 1) {
      frames.push(await sharp(layout.frame(index)).removeAlpha().raw().toBuffer());
      if (fs.existsSync(layout.motionField(index)))
        fields.push(readStoredField(fs.readFileSync(layout.motionField(index)), layout.motionField(index)).flow);
    }
    snapshot.set(clip.id, { frames, fields });
    // The views served now, derived from the frame, are the views the original format stored, pixel for pixel.
    for (const view of ['luma', 'chroma'] as const) {
      const stored = path.join(paths().clipDir(clip.id), 'views', view, '000005.png');
      const served = await viewImage(clip.id, 5, view, createFolderStore(paths().root));
      const depth = view === 'chroma' ? 'ushort' : 'uchar';
      const pixels = (image: string | Buffer) => sharp(image).raw({ depth }).toBuffer();
      expect((await pixels(served)).equals(await pixels(stored))).toBe(true);
    }
  }
  before = await buildPairsetNow(runtime, engineer, {
    projectIds: [projectId],
    views: ['frame', 'neighbour', 'luma', 'chroma', 'motion'],
    deltas: [1],
    graph: 'core',
    split: { val: 0.25, seed: 5 },
    shardMB: 0.5,
  });
  expect(before.state).toBe('built');
});
afterAll(async () => {
  await runtime.close();
  await server.close();
});

const packedClips = () => Clip.count({ where: { derivedFormat: 'packed' } });

describe('the compact-storage job', () => {
  it(`converts every clip, losing nothing over ${KILLS} kills of the worker`, async () => {
    const kills: string[] = [];
    for (let attempt = 0; attempt < KILLS && (await packedClips()) < CLIPS; attempt += 1) {
      const child = workers.start();
      const job = await workers.until(() =>
        Job.findOne({
          where: { kind: 'compact-storage', state: 'running', leaseOwner: { [Op.like]: `%:${child.pid}:%` } },
        }),
      );
      // Kill k waits until k − 1 clips of the run are converted (or the job is done), then a random time, so the
      // kills land in the writing, the switch and the removal of different clips.
      const target = (await packedClips()) + attempt;
      await workers.until(async () => (await job.reload()).state !== 'running' || (await packedClips()) >= target);
      await new Promise((done) => setTimeout(done, Math.random() * MAX_DELAY_MS));
      child.kill('SIGKILL');
      await exited(child);
      await job.reload();
      kills.push(`${job.stage ?? 'start'} at ${Math.round(job.progress * 100)}% (${await packedClips()} packed)`);
    }
    console.log(`compact-storage killed in: ${kills.join(', ')}`);
    const last = workers.start();
    await workers.until(
      async () => (await Job.findOne({ where: { kind: 'compact-storage', state: 'done' } })) !== null,
    );
    last.kill('SIGTERM');
    await exited(last);

    expect(await Job.count({ where: { kind: 'compact-storage', state: { [Op.ne]: 'done' } } })).toBe(0);
    for (const [clipId, stored] of snapshot) {
      const clip = (await Clip.findByPk(clipId))!;
      expect(clip.derivedFormat).toBe('packed');
      const layout = paths().clipDerived(clipId, 'packed');
      const clipDir = paths().clipDir(clipId);
      expect(fs.readdirSync(layout.framesDir).every((name) => name.endsWith('.webp'))).toBe(true);
      expect(fs.readdirSync(layout.motionDir).every((name) => name.endsWith('.field'))).toBe(true);
      expect(fs.existsSync(path.join(clipDir, 'views'))).toBe(false);
      expect(workFolders(server, clipId)).toEqual([]);
      expect(Number(clip.storedBytes)).toBe((await clipStoredUsage(createFolderStore(paths().root), clipId)).total);
      for (const [index, pixels] of stored.frames.entries()) {
        expect((await sharp(layout.frame(index)).removeAlpha().raw().toBuffer()).equals(pixels)).toBe(true);
      }
      const fields = fs.readdirSync(layout.motionDir).sort();
      expect(fields).toHaveLength(stored.fields.length);
      for (const [k, name] of fields.entries()) {
        const { flow, consistent } = readStoredField(fs.readFileSync(path.join(layout.motionDir, name)), name);
        // Each component within 1/128 px of the .flo's (the 1/64 px step of the KITTI 2015 encoding, rounded).
        const worst = flow.reduce((max, value, i) => Math.max(max, Math.abs(value - stored.fields[k]![i]!)), 0);
        expect(worst).toBeLessThanOrEqual(1 / 128);
        // The backward .flo was there, so the consistency plane was computed from it.
        expect(consistent).not.toBeNull();
      }
    }
  }, 300_000);

  it('gives byte-identical shards for the same definition built before and after the conversion', async () => {
    const again = await newPairsetVersion(before.id, engineer.id);
    await startBuild(again.id, engineer);
    await runtime.drain();
    const after = await getPairsetDetail(again.id);
    expect(after.state).toBe('built');
    expect(after.shards.map((shard) => [shard.bytes, shard.sha256])).toEqual(
      before.shards.map((shard) => [shard.bytes, shard.sha256]),
    );
    const shard = (detail: PairsetDetail, index: number) =>
      fs.readFileSync(paths().pairsetShard(detail.id, detail.shards[index]!.split, index));
    for (const index of before.shards.keys()) expect(shard(after, index).equals(shard(before, index))).toBe(true);
  });
});
