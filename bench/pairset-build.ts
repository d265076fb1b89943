/**
 * Pairset build benchmark (not a test): writes the shards of a pairset of frames only (frame~neighbour+1 over
 * accepted clips of incompressible 320 × 240 frames, stored as lossless WebP and written to the shards as PNG)
 * and, in the same run, archives the same PNG files, made beforehand, with GNU `tar -cf` as the reference; the
 * Kinefold side also decodes each stored frame and encodes its PNG. Reports both throughputs and their ratio
 * (goal ≥ 0.8×), best of five alternating rounds each, beside `tar -cf | sha256sum` (tar with the checksum a
 * shard carries) and SHA-256 alone over the same bytes, plus the whole build-pairset job (planning, shards, pair
 * difficulty, commit).
 *   npm run bench:pairsets [-- --mb 256]
 */
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs, promisify } from 'node:util';
import sharp from 'sharp';
import { loadConfig } from '../server/core/config';
import { openKinefoldDatabase } from '../server/core/db/open';
import { Clip, Frame, Pairset, Project } from '../server/core/models';
import { loadPairsetSources } from '../server/core/pairsets/pairset-sources';
import { createPairset, startBuild } from '../server/core/pairsets/pairsets';
import { createUser } from '../server/core/people/users';
import { storagePaths } from '../server/core/storage/paths';
import { createFolderStore } from '../server/core/storage/folder-store';
import { createObjectStore } from '../server/core/storage/open-store';
import { workerStorage } from '../worker/storage/worker-storage';
import { planPairs } from '../shared/pairing/pair-plan';
import { definitionViews, pairsetDefinitionSchema } from '../shared/schemas/pairsets';
import { viewFrame } from '../worker/pairsets/pair-members';
import { createViewReader } from '../worker/pairsets/view-reader';
import { writeShards } from '../worker/pairsets/write-shards';
import { createFramePool } from '../worker/pool/frame-pool';
import { createJobRuntime } from '../worker/runtime/job-runtime';

const { values } = parseArgs({ options: { mb: { type: 'string', default: '256' } } });
const WIDTH = 320;
const HEIGHT = 240;
const FRAMES_PER_CLIP = 50;
const ROUNDS = 5;
const run = promisify(execFile);
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-pairsets-'));
const config = loadConfig({ KINEFOLD_STORAGE_DIR: path.join(work, 'storage'), KINEFOLD_DEMO: 'off' });
const paths = storagePaths(config.storageDir);
const mib = (bytes: number) => bytes / 1024 ** 2;
/** The PNG a shard holds for a frame, made beforehand for the tar reference. */
const referenceFrame = (clipId: number, index: number) =>
  path.join(work, 'reference', String(clipId), `${String(index).padStart(6, '0')}.png`);

/** Accepted clips of noise frames: PNG cannot compress noise, so the bytes on disk are what a camera gives. */
async function makeClips(frameBytesWanted: number, projectId: number, uploaderId: number): Promise<void> {
  let written = 0;
  let seed = 0;
  while (written < frameBytesWanted) {
    const clip = await Clip.create({
      projectId,
      uploaderId,
      originalName: `noise-${seed}.mp4`,
      sizeBytes: 1,
      storedBytes: 1,
      sha256: createHash('sha256').update(String(seed)).digest('hex'),
      sourceExt: 'mp4',
      state: 'accepted',
      container: 'mov,mp4',
      codec: 'h264',
      durationS: FRAMES_PER_CLIP / 5,
      fps: 25,
      width: WIDTH,
      height: HEIGHT,
      rotation: 0,
      site: '',
      rig: '',
      capturedAt: null,
      tags: [],
      notes: '',
      frameCount: FRAMES_PER_CLIP,
    });
    const layout = paths.clipDerived(clip.id);
    fs.mkdirSync(layout.framesDir, { recursive: true });
    for (let index = 0; index < FRAMES_PER_CLIP; index += 1) {
      const noise = createHash('sha512');
      const pixels = Buffer.alloc(WIDTH * HEIGHT * 3);
      for (let offset = 0; offset < pixels.length; offset += 64) {
        noise.update(`${seed}:${index}:${offset}`);
        noise.copy().digest().copy(pixels, offset);
      }
      const image = sharp(pixels, { raw: { width: WIDTH, height: HEIGHT, channels: 3 } });
      await image.clone().webp({ lossless: true, effort: 0 }).toFile(layout.frame(index));
      const reference = referenceFrame(clip.id, index);
      fs.mkdirSync(path.dirname(reference), { recursive: true });
      await image.png().toFile(reference);
      written += fs.statSync(reference).size;
      await Frame.create({ clipId: clip.id, index, timeS: index / 5, sharpness: 500, cutBefore: false });
    }
    seed += 1;
  }
}

/** Runs the two sides in alternating rounds (so both meet the same machine load) and keeps each side's best. */
async function alternate(sides: [string, () => Promise<void>][]): Promise<number[]> {
  const fastest = sides.map(() => Infinity);
  for (let round = 0; round < ROUNDS; round += 1) {
    for (const [i, [, action]] of sides.entries()) {
      const start = performance.now();
      await action();
      fastest[i] = Math.min(fastest[i]!, (performance.now() - start) / 1000);
    }
  }
  sides.forEach(([label], i) => console.log(`${label}: best of ${ROUNDS} ${fastest[i]!.toFixed(2)} s`));
  return fastest;
}

const sequelize = await openKinefoldDatabase(config);
try {
  const user = await createUser(
    { email: 'bench@example.test', name: 'Bench', role: 'engineer', password: 'benchmark-password-long' },
    10,
    null,
  );
  const project = await Project.create({
    name: 'Pairset benchmark',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: WIDTH,
    deltas: [1],
    flagThresholds: {},
  });
  // Each frame is read twice (as a at t and as b at t − 1), so half the wanted shard bytes in frames.
  await makeClips((Number(values.mb) * 1024 ** 2) / 2, project.id, user.id);
  const definition = pairsetDefinitionSchema.parse({
    name: 'copy only',
    projectIds: [project.id],
    views: ['frame', 'neighbour'],
    deltas: [1],
    graph: 'core',
    split: { val: 0.1, seed: 1 },
  });
  const sources = await loadPairsetSources(definition);
  const planned = planPairs(sources, definitionViews(definition).pairs, definition.split, definition);
  // The shards hold every frame twice (as a and as b). GNU tar stores a name it has archived already as a hard
  // link, so its b-files come from a copy of the frames: both sides then read and write the same bytes.
  const mirror = path.join(work, 'mirror');
  for (const clip of sources) {
    fs.cpSync(path.dirname(referenceFrame(clip.id, 0)), path.join(mirror, String(clip.id)), { recursive: true });
  }
  const list = path.join(work, 'files.txt');
  fs.writeFileSync(
    list,
    planned
      .flatMap((item) => [
        referenceFrame(item.clipId, viewFrame(item.pair.a, item.moment)),
        path.join(mirror, String(item.clipId), path.basename(referenceFrame(0, viewFrame(item.pair.b, item.moment)))),
      ])
      .join('\n'),
  );

  const tarFile = path.join(work, 'reference.tar');
  const outDir = path.join(work, 'shards');
  let shardBytes = 0;
  const summedFile = path.join(work, 'reference-summed.tar');
  const [tarS, summedS, shardS] = await alternate([
    [
      'tar -cf of the same files',
      async () => {
        fs.rmSync(tarFile, { force: true });
        await run('tar', ['-cf', tarFile, '-P', '-T', list]);
      },
    ],
    [
      'tar -cf | tee | sha256sum (the same with a checksum)',
      async () => {
        fs.rmSync(summedFile, { force: true });
        const script = 'tar -cf - -P -T "$1" | tee "$2" | sha256sum';
        await run('bash', ['-o', 'pipefail', '-c', script, 'bench', list, summedFile]);
      },
    ],
    [
      'Kinefold shards (tar-stream, SHA-256)',
      async () => {
        fs.rmSync(outDir, { recursive: true, force: true });
        fs.mkdirSync(path.join(outDir, 'staging'), { recursive: true });
        const shards = await writeShards(planned, {
          outDir,
          stagingDir: path.join(outDir, 'staging'),
          shardMB: definition.shardMB,
          clips: new Map(sources.map((clip) => [clip.id, clip])),
          member: {
            reader: createViewReader(
              createFolderStore(config.storageDir),
              new Map(sources.map((clip) => [clip.id, clip])),
            ),
            motionFormat: definition.motionFormat,
          },
          progress: async () => undefined,
        });
        shardBytes = shards.reduce((sum, shard) => sum + shard.bytes, 0);
      },
    ],
  ]);
  const tarBytes = fs.statSync(tarFile).size;
  const tarContent = fs.readFileSync(tarFile);
  const hashStart = performance.now();
  createHash('sha256').update(tarContent).digest();
  const hashS = (performance.now() - hashStart) / 1000;

  const created = await createPairset(definition, user.id);
  await startBuild(created.id, user);
  const pool = createFramePool();
  const runtime = createJobRuntime({
    config,
    storage: workerStorage(config, createObjectStore(config)),
    pool,
    owner: 'bench',
  });
  const jobStart = performance.now();
  await runtime.runOnce();
  const jobS = (performance.now() - jobStart) / 1000;
  await pool.destroy();
  const built = (await Pairset.findByPk(created.id))!;

  console.log(
    `${planned.length} pairs from ${sources.length} clips; tar ${mib(tarBytes).toFixed(0)} MiB, ` +
      `shards ${mib(shardBytes).toFixed(0)} MiB`,
  );
  const ratio = mib(shardBytes) / shardS / (mib(tarBytes) / tarS);
  const summedRatio = mib(shardBytes) / shardS / (mib(tarBytes) / summedS);
  console.log(
    `tar -cf: ${(mib(tarBytes) / tarS).toFixed(0)} MiB/s; with sha256sum: ${(mib(tarBytes) / summedS).toFixed(
      0,
    )} MiB/s`,
  );
  console.log(
    `shards:  ${(mib(shardBytes) / shardS).toFixed(0)} MiB/s, ${ratio.toFixed(2)}× tar -cf ` +
      `(goal ≥ 0.8×), ${summedRatio.toFixed(2)}× tar -cf with sha256sum`,
  );
  console.log(`(SHA-256 alone of the same bytes: ${(mib(tarBytes) / hashS).toFixed(0)} MiB/s on this machine now)`);
  console.log(
    `whole build-pairset job (plan, shards, pair difficulty, commit): ${jobS.toFixed(2)} s, state ` +
      `${built.state}, ${mib(Number(built.bytes)).toFixed(0)} MiB`,
  );
} finally {
  await sequelize.close();
  fs.rmSync(work, { recursive: true, force: true });
}
