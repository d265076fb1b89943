import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { reprocessClip } from '../../server/core/clips/clip-media';
import { pictureCacheStats, setPictureCacheBytes } from '../../server/core/clips/made-pictures';
import { DEFAULT_PICTURE_CACHE_BYTES } from '../../server/core/clips/picture-cache';
import { Clip, MotionField } from '../../server/core/models';
import { updateProject } from '../../server/core/projects/projects';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { startTestRuntime } from '../helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

/**
 * Pictures made when asked (views, motion pictures) are made once per processing of the clip: kept in a
 * byte-bounded memory, and known by an ETag that needs no making (server/core/clips/made-pictures.ts).
 */

let server: TestServer;
let clip: Clip;
let adminId: number;
let projectId: number;
/** A frame a forward motion field starts from. */
let fieldIndex: number;

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'curator');
  adminId = (await addUser(server, 'admin')).id;
  projectId = (await addProject(adminId, 'pictures')).id;
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const file = await makePatternClip(path.join(gen, 'clip.mp4'), 3);
  clip = (await insertClip(server, file, projectId, adminId)).clip;
  await drainWorker();
  fieldIndex = (await MotionField.findOne({ where: { clipId: clip.id, direction: 'forward' } }))!.fromIndex;
});
afterAll(() => {
  setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);
  server.close();
});
// Each test starts with nothing kept, so the count of pictures made is its own.
beforeEach(() => setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES));

async function drainWorker(): Promise<void> {
  const worker = startTestRuntime(server);
  await worker.drain();
  await worker.close();
  await clip.reload();
}

const curator = async () => (await signedInAgent(server, 'curator@example.test')).agent;
const pictures = () => [
  `/api/clips/${clip.id}/views/0/luma`,
  `/api/clips/${clip.id}/views/0/chroma`,
  `/api/clips/${clip.id}/motion/${fieldIndex}`,
];

describe('pictures made when asked', () => {
  it.each([0, 1, 2])('are made once however often asked (picture %i), the same bytes and ETag each time', async (k) => {
    const agent = await curator();
    const url = pictures()[k]!;
    const first = await agent.get(url).buffer(true).parse(binary).expect(200);
    const made = pictureCacheStats().made;
    const second = await agent.get(url).buffer(true).parse(binary).expect(200);
    expect(made).toBe(1);
    expect(pictureCacheStats()).toMatchObject({ made: 1, kept: 1, entries: 1 });
    expect(second.headers.etag).toBe(first.headers.etag);
    expect(second.headers['cache-control']).toBe('private, no-cache');
    expect(second.headers['content-type']).toBe('image/png');
    expect(Buffer.compare(second.body as Buffer, first.body as Buffer)).toBe(0);
  });

  it('answer If-None-Match with 304 and the same ETag, making nothing even when nothing is kept', async () => {
    const agent = await curator();
    for (const url of pictures()) {
      const { headers } = await agent.get(url).expect(200);
      setPictureCacheBytes(DEFAULT_PICTURE_CACHE_BYTES);
      const again = await agent.get(url).set('If-None-Match', headers.etag!).expect(304);
      expect(again.headers.etag).toBe(headers.etag);
      expect(pictureCacheStats().made).toBe(0);
      // Another ETag is not a match: the picture is made and sent whole.
      await agent.get(url).set('If-None-Match', '"another"').expect(200);
      expect(pictureCacheStats().made).toBe(1);
    }
  });

  it('answer one byte range from the kept picture with 206, as before', async () => {
    const agent = await curator();
    const url = pictures()[0]!;
    const whole = await agent.get(url).buffer(true).parse(binary).expect(200);
    const part = await agent.get(url).set('Range', 'bytes=0-7').buffer(true).parse(binary).expect(206);
    expect(part.headers['content-range']).toBe(`bytes 0-7/${(whole.body as Buffer).length}`);
    expect(Buffer.compare(part.body as Buffer, (whole.body as Buffer).subarray(0, 8))).toBe(0);
    expect(pictureCacheStats().made).toBe(1);
  });

  it('never hold more bytes than the bound, the least recently used leaving first', async () => {
    const agent = await curator();
    const luma = Number((await agent.get(pictures()[0]!).expect(200)).headers['content-length']);
    const chroma = Number((await agent.get(pictures()[1]!).expect(200)).headers['content-length']);
    // Room for the chroma view and not for the luma view beside it.
    setPictureCacheBytes(chroma + Math.floor(luma / 2));
    for (const url of [pictures()[0]!, pictures()[1]!, pictures()[0]!, pictures()[1]!]) {
      await agent.get(url).expect(200);
      const stats = pictureCacheStats();
      expect(stats.bytes).toBeLessThanOrEqual(stats.maxBytes);
      expect(stats.entries).toBe(1);
    }
    expect(pictureCacheStats()).toMatchObject({ made: 4, kept: 0, bytes: chroma });
  });
});

describe('processing the clip again', () => {
  it('gives its pictures new ETags and new bytes; marking a cut gives the motion pictures new ones', async () => {
    const agent = await curator();
    const before = await Promise.all(
      pictures().map(async (url) => await agent.get(url).buffer(true).parse(binary).expect(200)),
    );
    // A smaller working size, so that the pictures made again really differ.
    await updateProject(projectId, { workingSize: 160 }, adminId);
    await reprocessClip(clip.id, adminId);
    await drainWorker();
    const after = await Promise.all(
      pictures().map(async (url) => await agent.get(url).buffer(true).parse(binary).expect(200)),
    );
    for (const [k, response] of after.entries()) {
      expect(response.headers.etag).not.toBe(before[k]!.headers.etag);
      expect(Buffer.compare(response.body as Buffer, before[k]!.body as Buffer)).not.toBe(0);
      expect((await sharp(response.body as Buffer).metadata()).width).toBe(160);
      // The copy the browser held is no longer fresh.
      await agent.get(pictures()[k]!).set('If-None-Match', before[k]!.headers.etag!).expect(200);
    }

    const motion = `/api/clips/${clip.id}/motion/${fieldIndex}`;
    // A cut away from the field's own frames, so the field still exists; the clip's scale may change with it.
    const { agent: marker, csrf } = await signedInAgent(server, 'curator@example.test');
    await marker
      .put(`/api/clips/${clip.id}/cuts/${fieldIndex + 3}`)
      .set('x-csrf-token', csrf)
      .send({ value: 'cut' })
      .expect(200);
    const afterCut = await agent.get(motion).set('If-None-Match', after[2]!.headers.etag!).expect(200);
    expect(afterCut.headers.etag).not.toBe(after[2]!.headers.etag);
  });
});
