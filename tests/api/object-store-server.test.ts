import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project, UploadReservation } from '../../server/core/models';
import type { ObjectStore } from '../../server/core/storage/object-store';
import { createObjectStore } from '../../server/core/storage/open-store';
import { objectKeys, storagePaths } from '../../server/core/storage/paths';
import { makeTestClip } from '../helpers/media-fixtures';
import { startS3Fake, type S3Fake } from '../helpers/s3-fake';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * The server over an S3-compatible bucket (s3rver): uploads land in the bucket, not the storage folder, and stored
 * files stream back with HTTP Range (RFC 9110 §14: 206 with Content-Range, 416 past the end, 304 when unchanged).
 */
let fake: S3Fake;
let server: TestServer;
let store: ObjectStore;
let operator: Awaited<ReturnType<typeof signedInAgent>>;
let projectId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-media-'));
let clipFile: string;

beforeAll(async () => {
  fake = await startS3Fake();
  Object.assign(process.env, fake.env);
  const s3 = { objectStore: `s3://${fake.bucket}/site-a`, s3Endpoint: fake.endpoint, s3Region: 'us-east-1' };
  server = await startTestServer(s3);
  store = createObjectStore({ ...s3, storageDir: server.storageDir });
  await addUser(server, 'operator');
  operator = await signedInAgent(server, 'operator@example.test');
  projectId = (
    await Project.create({
      name: 'Orchard',
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1, 2],
      flagThresholds: {},
    })
  ).id;
  clipFile = await makeTestClip(media, 'row-11.mp4', { seed: 11 });
}, 120_000);
afterAll(async () => {
  await server.close();
  await fake.close();
  fs.rmSync(media, { recursive: true, force: true });
});

function upload(file: string) {
  return operator.agent
    .post('/api/clips')
    .set('x-csrf-token', operator.csrf)
    .field('projectId', String(projectId))
    .attach('file', file);
}

describe('the server over an S3 bucket', () => {
  let clipId: number;

  it('admits an upload into the bucket and leaves nothing in the storage folder', async () => {
    const { body } = await upload(clipFile).expect(201);
    clipId = body.id;
    const clip = (await Clip.findByPk(clipId))!;
    const keys = (await store.list(objectKeys.clipDir(clipId))).map((object) => object.key);
    expect(keys).toEqual([`clips/${clipId}/source.${clip.sourceExt}`]);
    expect(await store.list(objectKeys.incomingDir)).toEqual([]);
    const local = storagePaths(server.storageDir);
    expect(fs.existsSync(local.clipDir(clipId))).toBe(false);
    expect(fs.readdirSync(local.incomingDir)).toEqual([]);
    expect(await UploadReservation.count()).toBe(0);
  });

  it('streams the source back whole and by range, with 416 past the end and 304 when unchanged', async () => {
    const bytes = fs.readFileSync(clipFile);
    const whole = await operator.agent.get(`/api/clips/${clipId}/source`).buffer(true).expect(200);
    expect(Buffer.compare(whole.body as Buffer, bytes)).toBe(0);
    expect(whole.headers['accept-ranges']).toBe('bytes');

    const part = await operator.agent.get(`/api/clips/${clipId}/source`).set('Range', 'bytes=100-1123').buffer(true);
    expect(part.status).toBe(206);
    expect(part.headers['content-range']).toBe(`bytes 100-1123/${bytes.length}`);
    expect(Buffer.compare(part.body as Buffer, bytes.subarray(100, 1124))).toBe(0);

    const past = await operator.agent.get(`/api/clips/${clipId}/source`).set('Range', `bytes=${bytes.length}-`);
    expect(past.status).toBe(416);
    expect(past.headers['content-range']).toBe(`bytes */${bytes.length}`);

    await operator.agent.get(`/api/clips/${clipId}/source`).set('If-None-Match', whole.headers.etag!).expect(304);
  });

  it('answers derived files from the bucket and a clear 404 for those not made', async () => {
    const preview = Buffer.from('not really a video, but bytes in the right place');
    await store.putBytes(objectKeys.clipDerived(clipId).preview, preview);
    const part = await operator.agent.get(`/api/clips/${clipId}/preview`).set('Range', 'bytes=4-9').buffer(true);
    expect(part.status).toBe(206);
    expect((part.body as Buffer).toString()).toBe('really');
    expect(part.headers['content-type']).toBe('video/mp4');

    const missing = await operator.agent.get(`/api/clips/${clipId}/thumbnail`).expect(404);
    expect(missing.body.error.message).toBe(`The thumbnail of clip ${clipId} not found.`);
  });

  it('removes every object of a deleted clip', async () => {
    await operator.agent.delete(`/api/clips/${clipId}`).set('x-csrf-token', operator.csrf).expect(204);
    expect(await store.list(objectKeys.clipDir(clipId))).toEqual([]);
  });
});
