import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { StoreNotUsable, type ObjectStore } from '../../../server/core/storage/object-store';
import { createObjectStore, parseObjectStoreUrl } from '../../../server/core/storage/open-store';
import { startS3Fake, type S3Fake } from '../../helpers/s3-fake';

/**
 * One contract, two stores: the storage folder and an S3-compatible bucket (s3rver). Byte ranges follow HTTP's
 * inclusive first-last positions (RFC 9110 §14.1.2); contents are compared by SHA-256 (node:crypto).
 */
let fake: S3Fake;
let scratch: string;
const stores: Record<'folder' | 's3', () => ObjectStore> = {
  folder: () => createObjectStore({ ...noS3, storageDir: path.join(scratch, 'folder-store') }),
  s3: () =>
    createObjectStore({
      storageDir: path.join(scratch, 'unused'),
      objectStore: `s3://${fake.bucket}/installation`,
      s3Endpoint: fake.endpoint,
      s3Region: 'us-east-1',
    }),
};
const noS3 = { objectStore: null, s3Endpoint: null, s3Region: 'us-east-1' };
const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

beforeAll(async () => {
  fake = await startS3Fake();
  Object.assign(process.env, fake.env);
  scratch = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-store-'));
});
afterAll(async () => {
  await fake.close();
  fs.rmSync(scratch, { recursive: true, force: true });
});

describe.each(['folder', 's3'] as const)('the %s store', (kind) => {
  let store: ObjectStore;
  beforeAll(async () => {
    store = stores[kind]();
    await store.ready();
  });

  it('keeps a file under its key and answers whole reads, heads and byte ranges', async () => {
    const bytes = randomBytes(10_000);
    const file = path.join(scratch, `${kind}-source.bin`);
    fs.writeFileSync(file, bytes);
    await store.putFile('clips/7/source.mp4', file);
    expect(fs.existsSync(file)).toBe(true);

    expect(sha256((await store.getBytes('clips/7/source.mp4'))!)).toBe(sha256(bytes));
    expect((await store.head('clips/7/source.mp4'))?.size).toBe(10_000);

    const read = (await store.get('clips/7/source.mp4', { start: 100, end: 1099 }))!;
    const slice = Buffer.concat(await read.body.toArray());
    expect(read.size).toBe(10_000);
    expect(read.range).toEqual({ start: 100, end: 1099 });
    expect(slice.length).toBe(1000);
    expect(sha256(slice)).toBe(sha256(bytes.subarray(100, 1100)));
  });

  it('answers null, not an error, for what is not there', async () => {
    expect(await store.head('clips/404/preview.mp4')).toBeNull();
    expect(await store.get('clips/404/preview.mp4')).toBeNull();
    expect(await store.getBytes('clips/404/preview.mp4')).toBeNull();
    expect(await store.getFile('clips/404/preview.mp4', path.join(scratch, 'never'))).toBe(false);
    expect(await store.list('clips/404')).toEqual([]);
    await expect(store.delete('clips/404')).resolves.toBeUndefined();
  });

  it('moves a local file in, leaving nothing behind', async () => {
    const file = path.join(scratch, `${kind}-incoming.part`);
    fs.writeFileSync(file, 'moved bytes');
    await store.putFile('incoming/upload-1', file, { move: true });
    expect(fs.existsSync(file)).toBe(false);
    await store.move('incoming/upload-1', 'clips/8/source.webm');
    expect(await store.head('incoming/upload-1')).toBeNull();
    expect((await store.getBytes('clips/8/source.webm'))?.toString()).toBe('moved bytes');
  });

  it('streams an upload of unknown length in parts and copies it back out to a local file', async () => {
    // 12 MiB is above the 5 MiB part size, so the S3 store sends it as a multipart upload.
    const bytes = randomBytes(12 * 1024 * 1024);
    const chunks = Array.from({ length: 12 }, (_, i) => bytes.subarray(i * 1024 * 1024, (i + 1) * 1024 * 1024));
    await store.putStream('pairsets/3/shard-train-000000.tar', Readable.from(chunks));
    const copy = path.join(scratch, kind, 'shard.tar');
    expect(await store.getFile('pairsets/3/shard-train-000000.tar', copy)).toBe(true);
    expect(sha256(fs.readFileSync(copy))).toBe(sha256(bytes));
  });

  it('lists, measures and removes one prefix without touching a neighbour whose key starts the same', async () => {
    await store.putBytes('clips/12/frames/000000.webp', Buffer.alloc(300));
    await store.putBytes('clips/12/frames/000001.webp', Buffer.alloc(200));
    await store.putBytes('clips/12/preview.mp4', Buffer.alloc(50));
    await store.putBytes('clips/123/preview.mp4', Buffer.alloc(7));

    expect((await store.list('clips/12')).map((object) => object.key)).toEqual([
      'clips/12/frames/000000.webp',
      'clips/12/frames/000001.webp',
      'clips/12/preview.mp4',
    ]);
    expect(await store.size('clips/12')).toBe(550);
    expect(await store.size('clips/12/frames')).toBe(500);

    await store.delete('clips/12');
    expect(await store.list('clips/12')).toEqual([]);
    expect(await store.size('clips/123')).toBe(7);
  });

  it('gives a changed object a new entity tag', async () => {
    await store.putBytes('clips/9/thumbs/thumbnail.jpg', Buffer.from('first'));
    const before = await store.head('clips/9/thumbs/thumbnail.jpg');
    await store.putBytes('clips/9/thumbs/thumbnail.jpg', Buffer.from('second, longer'));
    const after = await store.head('clips/9/thumbs/thumbnail.jpg');
    expect(after?.size).toBe(14);
    expect(after?.etag).not.toBe(before?.etag);
  });
});

describe('opening the S3 store', () => {
  it('reads the bucket and prefix of KINEFOLD_OBJECT_STORE and refuses anything else by name', () => {
    expect(parseObjectStoreUrl('s3://kinefold-media')).toEqual({ bucket: 'kinefold-media', prefix: '' });
    expect(parseObjectStoreUrl('s3://kinefold-media/site/a/')).toEqual({ bucket: 'kinefold-media', prefix: 'site/a' });
    expect(() => parseObjectStoreUrl('/srv/kinefold')).toThrow(/KINEFOLD_OBJECT_STORE/);
  });

  it('names the variable when the bucket is missing or the endpoint does not answer', async () => {
    const missing = createObjectStore({ storageDir: scratch, objectStore: 's3://no-such-bucket', s3Endpoint: fake.endpoint, s3Region: 'us-east-1' });
    await expect(missing.ready()).rejects.toThrow(StoreNotUsable);
    await expect(missing.ready()).rejects.toThrow(/KINEFOLD_OBJECT_STORE: bucket "no-such-bucket".*no such bucket/);

    // Port 9 (discard) is closed on test machines: the connection is refused at once.
    const closed = createObjectStore({ storageDir: scratch, objectStore: 's3://kinefold-test', s3Endpoint: 'http://127.0.0.1:9', s3Region: 'us-east-1' });
    await expect(closed.ready()).rejects.toThrow(/KINEFOLD_S3_ENDPOINT http:\/\/127\.0\.0\.1:9/);
  });
});
