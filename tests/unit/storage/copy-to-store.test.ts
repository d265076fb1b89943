import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { copyIntoStore } from '../../../server/core/storage/copy-to-store';
import { createFolderStore } from '../../../server/core/storage/folder-store';
import type { ObjectStore } from '../../../server/core/storage/object-store';
import { createObjectStore } from '../../../server/core/storage/open-store';
import { startS3Fake, type S3Fake } from '../../helpers/s3-fake';

let fake: S3Fake;
let folder: string;
let target: ObjectStore;
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

/** A folder installation: two clips and a pairset, plus what must not move (a stage's work, a removal, uploads). */
const kept = [
  'clips/1/source.mp4',
  'clips/1/frames/000000.webp',
  'clips/1/motion/000000.field',
  'clips/2/source.mkv',
  'pairsets/4/pairset.json',
  'pairsets/4/shard-train-000000.tar',
];
const leftBehind = [
  'clips/1/work-sample-3f2a/frames/000000.webp',
  'clips/.removing-3-a1b2c3d4/source.mp4',
  'pairsets/work-5-77aa/shard-train-000000.tar',
  'incoming/upload-9.part',
];

beforeAll(async () => {
  fake = await startS3Fake();
  Object.assign(process.env, fake.env);
  folder = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-folder-'));
  for (const key of [...kept, ...leftBehind]) {
    fs.mkdirSync(path.dirname(path.join(folder, key)), { recursive: true });
    fs.writeFileSync(path.join(folder, key), randomBytes(1000 + key.length));
  }
  target = createObjectStore({
    storageDir: folder,
    objectStore: `s3://${fake.bucket}/moved`,
    s3Endpoint: fake.endpoint,
    s3Region: 'us-east-1',
  });
});
afterAll(async () => {
  await fake.close();
  fs.rmSync(folder, { recursive: true, force: true });
});

it('copies what the installation keeps, resumes after a stop and copies nothing twice', async () => {
  const source = createFolderStore(folder);
  // A run stopped after its third object: a store that fails from then on stands in for a killed process.
  let puts = 0;
  const failing: ObjectStore = {
    ...target,
    async putStream(key, body) {
      if ((puts += 1) > 3) throw new Error('connection lost');
      await target.putStream(key, body);
    },
  };
  await expect(copyIntoStore(source, failing)).rejects.toThrow('connection lost');

  const resumed = await copyIntoStore(source, target);
  expect(resumed).toMatchObject({ copied: kept.length - 3, skipped: 3 });
  for (const key of kept) {
    expect(sha256((await target.getBytes(key))!)).toBe(sha256(fs.readFileSync(path.join(folder, key))));
  }
  for (const key of leftBehind) expect(await target.head(key)).toBeNull();

  expect(await copyIntoStore(source, target)).toEqual({ copied: 0, skipped: kept.length, copiedBytes: 0 });
});
