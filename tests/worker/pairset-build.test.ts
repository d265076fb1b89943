import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Job, MailOutbox, Pairset, QuotaWarning, Shard, type User } from '../../server/core/models';
import {
  cancelBuild,
  createPairset,
  getPairsetDetail,
  newPairsetVersion,
  startBuild,
} from '../../server/core/pairsets/pairsets';
import { storagePaths } from '../../server/core/storage/paths';
import { decodeChroma } from '../../shared/colour/view-encoding';
import { shardFileName } from '../../shared/pairing/shard-name';
import type { PairsetDetail, PairsetManifest } from '../../shared/types/pairsets';
import { decodeFlo, encodeFlo } from '../../shared/motion/formats/flo';
import { decodePackedField } from '../../server/core/media/packed-field';
import { decodeKittiComponent } from '../../shared/motion/formats/kitti-png';
import { addPairsetClip } from '../helpers/pairset-clips';
import { buildPairsetNow, pairsetDefinition } from '../helpers/pairset-build';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';
import { readUstar, type UstarArchive } from '../helpers/ustar-reader';

let server: TestServer;
let runtime: TestRuntime;
let engineer: User;
let projectId: number;
let staticProjectId: number;
/** Clip ids by role in the fixture. */
const ids = { cut: 0, long: 0, short: 0, waiting: 0, rejected: 0 };
const CUT_AT = 8;
let built: PairsetDetail;

interface PairJson {
  key: string;
  kind: string;
  split: 'train' | 'val';
  clip: { id: number };
  moment: { frame: number };
  a: { view: string; frame: number; file: string; delta: number | null };
  b: { view: string; frame: number; file: string; delta: number | null };
  estimator: string | null;
}

const paths = () => storagePaths(server.storageDir);
const shardPath = (detail: PairsetDetail, index: number) =>
  paths().pairsetShard(detail.id, detail.shards[index]!.split, index);
const readShard = (detail: PairsetDetail, index: number) => readUstar(fs.readFileSync(shardPath(detail, index)));
const json = <T>(data: Buffer) => JSON.parse(data.toString('utf8')) as T;
const pairsOf = (archive: UstarArchive) =>
  archive.members.filter((member) => member.name.endsWith('/pair.json')).map((member) => json<PairJson>(member.data));

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  engineer = await addUser(server, 'engineer');
  const admin = await addUser(server, 'admin');
  projectId = (await addProject(admin.id, 'terraces')).id;
  staticProjectId = (await addProject(admin.id, 'still camera')).id;
  const base = { projectId, uploaderId: admin.id };
  ids.cut = (await addPairsetClip(server, { ...base, frames: 16, cutsBefore: [CUT_AT], seed: 1, site: 'North' })).id;
  ids.long = (await addPairsetClip(server, { ...base, frames: 14, seed: 2, site: 'South' })).id;
  ids.short = (await addPairsetClip(server, { ...base, frames: 10, seed: 3, site: 'South' })).id;
  for (let seed = 4; seed < 8; seed += 1) await addPairsetClip(server, { ...base, frames: 8, seed, site: 'East' });
  ids.waiting = (await addPairsetClip(server, { ...base, frames: 8, seed: 9, state: 'awaiting_review' })).id;
  ids.rejected = (await addPairsetClip(server, { ...base, frames: 8, seed: 10, state: 'rejected' })).id;
  await addPairsetClip(server, { projectId: staticProjectId, uploaderId: admin.id, frames: 20, shift: 0, seed: 11 });
  built = await buildPairsetNow(runtime, engineer, {
    projectIds: [projectId],
    views: ['frame', 'neighbour', 'luma', 'chroma', 'motion'],
    deltas: [2],
    graph: 'core',
    split: { val: 0.4, seed: 3 },
    shardMB: 0.25,
  });
});
afterAll(async () => {
  await runtime?.close();
  await server?.close();
});

describe('a built pairset', () => {
  it('is built, with shards numbered across both splits in one sequence, train first', async () => {
    expect(built).toMatchObject({ state: 'built', progress: 1, error: null });
    expect(built.shards.length).toBeGreaterThan(2);
    const splits = built.shards.map((shard) => shard.split);
    expect(splits).toEqual([...splits].sort((x, y) => (x === y ? 0 : x === 'train' ? -1 : 1)));
    expect(new Set(splits)).toEqual(new Set(['train', 'val']));
    built.shards.forEach((shard, index) => {
      expect(shard.index).toBe(index);
      expect(shard.file).toBe(shardFileName(shard.split, index));
      expect(fs.existsSync(shardPath(built, index))).toBe(true);
    });
    const job = await Job.findOne({ where: { pairsetId: built.id } });
    expect(job).toMatchObject({ kind: 'build-pairset', state: 'done', progress: 1 });
  });

  it('writes shards that are POSIX ustar: 512-byte blocks, fixed headers, ≥ 1024 trailing zero bytes', () => {
    // Layout and checksum rule: CHECK-VALUES §10 (glibc tar.h, FreeBSD tar(5), git tar.h offsets).
    for (let index = 0; index < built.shards.length; index += 1) {
      const bytes = fs.readFileSync(shardPath(built, index));
      expect(bytes.length % 512).toBe(0);
      const archive = readUstar(bytes);
      expect(archive.trailingZeroBytes).toBeGreaterThanOrEqual(1024);
      for (const member of archive.members) {
        expect(member).toMatchObject({
          mode: 0o644,
          uid: 0,
          gid: 0,
          mtime: 0,
          uname: '',
          gname: '',
          typeflag: '0',
          magic: 'ustar',
          version: '00',
        });
        expect(member.offset % 512).toBe(0);
      }
      expect(archive.members[0]!.name).toBe('index.json');
    }
  });

  it('reads back with GNU tar, index.json first, every pair as a.<ext>, b.<ext> and pair.json', () => {
    const listing = execFileSync('tar', ['-tvf', shardPath(built, 0)], { encoding: 'utf8' })
      .trim()
      .split('\n');
    expect(listing[0]).toMatch(/^-rw-r--r-- 0\/0 +\d+ 1970-01-01 00:00 index\.json$/);
    const names = execFileSync('tar', ['-tf', shardPath(built, 0)], { encoding: 'utf8' })
      .trim()
      .split('\n');
    const index = json<{ shard: number; split: string; pairs: string[] }>(readShard(built, 0).members[0]!.data);
    expect(index).toMatchObject({ shard: 0, split: 'train' });
    expect(names.slice(1)).toEqual(
      index.pairs.flatMap((key) => {
        const ext = key.endsWith('~motion') ? 'flo' : 'png';
        return [`pairs/${key}/a.png`, `pairs/${key}/b.${ext}`, `pairs/${key}/pair.json`];
      }),
    );
    expect(built.shards[0]!.pairCount).toBe(index.pairs.length);
  });

  it('lists each shard in pairset.json with its size and SHA-256, and the rows agree', async () => {
    const manifest = json<PairsetManifest>(fs.readFileSync(paths().pairsetManifest(built.id)));
    expect(manifest.shards).toEqual(built.shards);
    expect(manifest).toMatchObject({ seed: 3, definition: { split: { val: 0.4, seed: 3 }, shardMB: 0.25 } });
    for (const shard of manifest.shards) {
      const bytes = fs.readFileSync(paths().pairsetShard(built.id, shard.split, shard.index));
      expect(shard.bytes).toBe(bytes.length);
      expect(shard.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    }
    expect(await Shard.count({ where: { pairsetId: built.id } })).toBe(manifest.shards.length);
    const folder = paths().pairsetDir(built.id);
    const expectedBytes = fs
      .readdirSync(folder)
      .reduce((sum, name) => sum + fs.statSync(path.join(folder, name)).size, 0);
    expect((await Pairset.findByPk(built.id))!.bytes).toBe(expectedBytes);
  });

  it('takes only accepted clips, puts no clip in both splits, and no pair spans a cut or passes the clip end', () => {
    const pairs = built.shards.flatMap((_shard, index) => pairsOf(readShard(built, index)));
    expect(pairs.length).toBe(built.stats!.pairs.total);
    const clips = new Set(pairs.map((pair) => pair.clip.id));
    expect(clips.has(ids.waiting)).toBe(false);
    expect(clips.has(ids.rejected)).toBe(false);
    expect(clips.size).toBe(7);
    const splitOf = new Map<number, Set<string>>();
    for (const pair of pairs) splitOf.set(pair.clip.id, (splitOf.get(pair.clip.id) ?? new Set()).add(pair.split));
    for (const splits of splitOf.values()) expect(splits.size).toBe(1);
    const frameCount = new Map([
      [ids.cut, 16],
      [ids.long, 14],
      [ids.short, 10],
    ]);
    for (const pair of pairs) {
      const last = Math.max(pair.a.frame, pair.b.frame, pair.kind.endsWith('~motion') ? pair.moment.frame + 1 : 0);
      expect(last).toBeLessThan(frameCount.get(pair.clip.id) ?? 8);
      if (pair.clip.id === ids.cut) expect(pair.moment.frame < CUT_AT && last >= CUT_AT).toBe(false);
    }
    // The cut clip: frame~neighbour+2 at t = 0…5 before the cut and 8…13 after it.
    const cutNeighbours = pairs.filter((pair) => pair.clip.id === ids.cut && pair.kind === 'frame~neighbour+2');
    expect(cutNeighbours.map((pair) => pair.moment.frame)).toEqual([0, 1, 2, 3, 4, 5, 8, 9, 10, 11, 12, 13]);
    expect(cutNeighbours.every((pair) => pair.b.delta === 2 && pair.b.frame === pair.moment.frame + 2)).toBe(true);
  });

  it('writes the stored frame as PNG and the stored field as .flo, pixel for pixel, when no size is set', async () => {
    const archive = readShard(built, 0);
    const pair = pairsOf(archive).find((candidate) => candidate.kind === 'frame~motion')!;
    const member = (name: string) => archive.members.find((m) => m.name === `pairs/${pair.key}/${name}`)!.data;
    const layout = paths().clipDerived(pair.clip.id);
    expect((await sharp(member('a.png')).metadata()).format).toBe('png');
    const stored = await sharp(layout.frame(pair.moment.frame)).removeAlpha().raw().toBuffer();
    expect((await sharp(member('a.png')).raw().toBuffer()).equals(stored)).toBe(true);
    const field = decodePackedField(fs.readFileSync(layout.motionField(pair.moment.frame)));
    expect(Buffer.from(member('b.flo')).equals(Buffer.from(encodeFlo(field.flow, field.width, field.height)))).toBe(
      true,
    );
    expect(pair.estimator).toBe('farneback');
  });

  it('gives byte-identical shards when the same definition is built again', async () => {
    const again = await newPairsetVersion(built.id, engineer.id);
    await startBuild(again.id, engineer);
    await runtime.drain();
    const rebuilt = await getPairsetDetail(again.id);
    expect(rebuilt).toMatchObject({ state: 'built', version: 2, name: built.name });
    expect(rebuilt.shards).toEqual(built.shards);
    for (let index = 0; index < built.shards.length; index += 1) {
      expect(fs.readFileSync(shardPath(rebuilt, index)).equals(fs.readFileSync(shardPath(built, index)))).toBe(true);
    }
    expect(rebuilt.stats).toEqual(built.stats);
    // The difficulty report, trained critics included, is the same: seeded sampling, training and batch order.
    const report = async (id: number) => (await Pairset.findByPk(id))!.difficulty!;
    expect((await report(again.id)).critic).toBeDefined();
    expect(await report(again.id)).toEqual(await report(built.id));
  });

  it('counts statistics per view pair, split, site and project', () => {
    const stats = built.stats!;
    expect(stats.kinds.map((kind) => kind.kind)).toEqual([
      'frame~neighbour+2',
      'frame~luma',
      'frame~chroma',
      'frame~motion',
    ]);
    // Per clip of n frames: frame~luma and frame~chroma at every frame; frame~motion where t+1 exists;
    // frame~neighbour+2 where t+2 exists; the cut clip loses the moments whose reach crosses frame 8.
    const perClip = (n: number, cut = false) => ({ neighbour: cut ? 12 : n - 2, same: n, motion: cut ? 14 : n - 1 });
    const clips = [perClip(16, true), perClip(14), perClip(10), perClip(8), perClip(8), perClip(8), perClip(8)];
    const total = (key: 'neighbour' | 'same' | 'motion') => clips.reduce((sum, clip) => sum + clip[key], 0);
    expect(stats.kinds.map((kind) => kind.total)).toEqual([
      total('neighbour'),
      total('same'),
      total('same'),
      total('motion'),
    ]);
    expect(stats.clips.total).toBe(7);
    expect(stats.footageHours.total).toBeCloseTo((16 + 14 + 10 + 4 * 8) / 5 / 3600, 12);
    expect(stats.bySite.map((site) => site.site).sort()).toEqual(['East', 'North', 'South']);
    expect(stats.byProject).toEqual([{ projectId, projectName: 'terraces', clips: 7, pairs: stats.pairs.total }]);
    expect(stats.sharpness.counts.reduce((sum, count) => sum + count, 0)).toBe(stats.moments);
    expect(stats.motionMagnitude.counts.reduce((sum, count) => sum + count, 0) + stats.motionMagnitude.missing).toBe(
      stats.moments,
    );
  });
});

describe('output size and motion format', () => {
  it('resizes every view with its channels and depth, and rescales KITTI motion with the picture', async () => {
    const detail = await buildPairsetNow(runtime, engineer, {
      projectIds: [projectId],
      views: ['frame', 'luma', 'chroma', 'motion'],
      graph: 'full',
      outputSize: 32,
      motionFormat: 'kitti-png',
      split: { val: 0, seed: 1 },
    });
    expect(detail.state).toBe('built');
    const archive = readShard(detail, 0);
    const file = (suffix: string) => archive.members.find((member) => member.name.endsWith(suffix))!.data;
    const frame = await sharp(file('~luma/a.png')).metadata();
    const luma = await sharp(file('~luma/b.png')).metadata();
    const chroma = await sharp(file('~chroma/b.png')).metadata();
    expect([frame.width, frame.height, frame.channels, frame.depth]).toEqual([32, 24, 3, 'uchar']);
    expect([luma.width, luma.height, luma.channels, luma.depth]).toEqual([32, 24, 1, 'uchar']);
    expect([chroma.width, chroma.height, chroma.channels, chroma.depth]).toEqual([32, 24, 3, 'ushort']);
    const codes = await sharp(file('chroma~motion/b.png')).toColourspace('rgb16').raw({ depth: 'ushort' }).toBuffer();
    const kitti = new Uint16Array(codes.buffer, codes.byteOffset, codes.length / 2);
    expect(kitti.length).toBe(32 * 24 * 3);
    // The fixture's fields are (1, 0) px at 64 × 48; at 32 × 24 they are (0.5, 0). KITTI 2015 devkit:
    // u = (ch1 − 2^15)/64, valid = ch3, so 0.5 px is 32800 (CHECK-VALUES §3).
    expect(decodeKittiComponent(kitti[0]!)).toBe(0.5);
    expect([kitti[0], kitti[1], kitti[2]]).toEqual([32800, 32768, 1]);
    const chromaRaw = await sharp(file('~chroma/b.png')).toColourspace('rgb16').raw({ depth: 'ushort' }).toBuffer();
    const a = new Float32Array(32 * 24);
    const chromaCodes = new Uint16Array(chromaRaw.buffer, chromaRaw.byteOffset, chromaRaw.length / 2);
    decodeChroma(chromaCodes, a, new Float32Array(a.length));
    expect(Math.max(...a) - Math.min(...a)).toBeGreaterThan(10);
  });

  it('rescales .flo fields to the output size', async () => {
    const detail = await buildPairsetNow(runtime, engineer, {
      projectIds: [projectId],
      views: ['frame', 'motion'],
      graph: 'core',
      outputSize: 16,
      split: { val: 0, seed: 1 },
    });
    const member = readShard(detail, 0).members.find((m) => m.name.endsWith('/b.flo'))!;
    const field = decodeFlo(member.data);
    expect([field.width, field.height]).toEqual([16, 12]);
    expect(field.flow[0]).toBeCloseTo(0.25, 6);
    expect(field.flow[1]).toBe(0);
  });
});

describe('pair difficulty during the build', () => {
  it('reads exactly log K for views a fixed embedding cannot tell apart (a still camera)', async () => {
    const detail = await buildPairsetNow(runtime, engineer, {
      projectIds: [staticProjectId],
      views: ['frame', 'neighbour'],
      deltas: [1],
      graph: 'core',
      split: { val: 0, seed: 1 },
      temperature: 0.5,
    });
    const difficulty = (await Pairset.findByPk(detail.id))!.difficulty!;
    expect(difficulty.temperature).toBe(0.5);
    const [kind] = difficulty.kinds;
    // 19 pairs fill one batch of 16 and none of 64 or 256.
    expect(kind).toMatchObject({ kind: 'frame~neighbour+1', sampled: 19 });
    expect(kind!.results.map((result) => result.k)).toEqual([16]);
    // Every frame is the same, so every candidate scores alike: a uniform scorer gives exactly log K and a bound
    // of 0 at any τ (CHECK-VALUES §7, from InfoNCE of van den Oord et al. 2018, Eq. 4).
    expect(kind!.results[0]!.meanLoss).toBeCloseTo(Math.log(16), 12);
    expect(kind!.results[0]!.bound).toBeCloseTo(0, 12);
    expect(kind!.results[0]!.reading).toBe('unrelated');
  });

  it('samples every view pair of a build and reports each K the sample fills', async () => {
    const difficulty = (await Pairset.findByPk(built.id))!.difficulty!;
    expect(difficulty).toMatchObject({ temperature: 0.07, ks: [16, 64, 256], sampleLimit: 512 });
    expect(difficulty.kinds.map((kind) => kind.kind)).toEqual(built.stats!.kinds.map((kind) => kind.kind));
    difficulty.kinds.forEach((kind, k) => {
      const total = built.stats!.kinds[k]!.total;
      expect(kind.sampled).toBe(Math.min(total, 512));
      expect(kind.results.map((result) => result.k)).toEqual([16, 64, 256].filter((size) => size <= kind.sampled));
      for (const result of kind.results) {
        expect(result.logK).toBe(Math.log(result.k));
        expect(result.bound).toBeCloseTo(result.logK - result.meanLoss, 12);
        expect(result.anchors).toBe(2 * result.batches * result.k);
      }
    });
  });

  it('trains a critic per view pair on train pairs and measures it on held-out val pairs', async () => {
    const critic = (await Pairset.findByPk(built.id))!.difficulty!.critic!;
    expect(critic.kinds.map((kind) => kind.kind)).toEqual(built.stats!.kinds.map((kind) => kind.kind));
    expect(critic.sampleLimit).toBe(512);
    critic.kinds.forEach((kind, k) => {
      const counts = built.stats!.kinds[k]!;
      expect(kind.trainPairs).toBe(Math.min(counts.train, 512));
      expect(kind.heldOutPairs).toBe(Math.min(counts.val, 512));
      expect(kind.heldOutPairs).toBeGreaterThanOrEqual(16);
      const training = kind.training!;
      // The fixed budget: every curveEvery steps one point, whatever the sample size.
      expect(training.steps).toBe(critic.options.steps);
      expect(training.curve.map((point) => point.step)).toEqual(
        Array.from(
          { length: critic.options.steps / critic.options.curveEvery },
          (_, i) => (i + 1) * critic.options.curveEvery,
        ),
      );
      expect(training.keptStep).toBeLessThanOrEqual(training.steps);
      expect(training.fitPairs + training.stopPairs).toBe(kind.trainPairs);
      expect(kind.results.map((result) => result.k)).toEqual([16, 64, 256]);
      for (const result of kind.results) {
        const fills = kind.heldOutPairs >= result.k;
        expect(result.heldOut !== null).toBe(fills);
        expect(result.floor !== null).toBe(fills);
        if (!result.heldOut) continue;
        // InfoNCE can never exceed log K (van den Oord et al. 2018, Eq. 4 [V2]).
        expect(result.heldOut.bound).toBeLessThanOrEqual(result.logK);
        expect(result.heldOut.anchors).toBe(2 * Math.floor(kind.heldOutPairs / result.k) * result.k);
      }
      expect(['trivial', 'shared', 'nothing-found']).toContain(kind.reading);
      expect(kind.message).toMatch(/held-out/);
    });
  });
});

describe('failing and cancelling', () => {
  it('stops a running build between pairs when cancelled, leaving no files and a cancelled job', async () => {
    const created = await createPairset(
      pairsetDefinition({
        projectIds: [projectId],
        views: ['frame', 'neighbour', 'luma', 'chroma', 'motion'],
        deltas: [1, 2, 3],
        graph: 'full',
        outputSize: 48,
        motionFormat: 'kitti-png',
      }),
      engineer.id,
    );
    await startBuild(created.id, engineer);
    const running = runtime.runtime.runOnce();
    while ((await Pairset.findByPk(created.id))!.progress === 0) await new Promise((done) => setTimeout(done, 20));
    await cancelBuild(created.id, engineer);
    await running;
    const pairset = (await Pairset.findByPk(created.id))!;
    expect(pairset.state).toBe('cancelled');
    expect(pairset.progress).toBeLessThan(0.85);
    expect(await Job.findOne({ where: { pairsetId: created.id } })).toMatchObject({ state: 'cancelled' });
    expect(fs.existsSync(paths().pairsetDir(created.id))).toBe(false);
    expect(fs.readdirSync(paths().pairsetsDir).filter((name) => name.startsWith(`work-${created.id}-`))).toEqual([]);
    expect(await Shard.count({ where: { pairsetId: created.id } })).toBe(0);
  });

  it('fails at once, with a plain message and no files, when the definition gives no pairs', async () => {
    const emptyProject = (await addProject(engineer.id, 'nothing accepted yet')).id;
    const detail = await buildPairsetNow(runtime, engineer, { projectIds: [emptyProject] });
    expect(detail.state).toBe('failed');
    expect(detail.error).toMatch(/gives no pairs/);
    expect(fs.existsSync(paths().pairsetDir(detail.id))).toBe(false);
    expect(fs.readdirSync(paths().pairsetsDir).filter((name) => name.startsWith('work-'))).toEqual([]);
  });
});

describe('a build that takes its owner past a quota threshold', () => {
  it('tells the owner and the admins once, for 80 % and not yet 100 %', async () => {
    const definition = { projectIds: [projectId], views: ['frame', 'neighbour'] as const, deltas: [1] };
    const first = await buildPairsetNow(runtime, engineer, { ...definition, views: [...definition.views] });
    // The same definition gives the same shard bytes; only the manifest's name differs by a few bytes.
    const owner = await addUser(server, 'engineer', 'quota-engineer@example.test');
    await owner.update({ quotaBytes: Math.round(first.bytes / 0.9) });
    const before = await MailOutbox.count({ where: { template: 'quota-threshold' } });
    const second = await buildPairsetNow(runtime, owner, { ...definition, views: [...definition.views] });
    expect(second.state).toBe('built');
    const warnings = await QuotaWarning.findAll({ where: { scope: 'user', scopeId: owner.id } });
    expect(warnings.map((warning) => warning.percent)).toEqual([80]);
    const mails = await MailOutbox.findAll({ where: { template: 'quota-threshold' }, order: [['id', 'ASC']] });
    expect(
      mails
        .slice(before)
        .map((mail) => mail.to)
        .sort(),
    ).toEqual(['admin@example.test', 'quota-engineer@example.test']);
  });
});
