import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, MotionField } from '../../server/core/models';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { startTestRuntime } from '../helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

/** `?height=` on frames and motion pictures: the frame strip's small copies (server/core/media/frame-images.ts). */

let server: TestServer;
let clip: Clip;
let fieldIndex: number;

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'curator');
  const admin = await addUser(server, 'admin');
  const project = await addProject(admin.id, 'strip');
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  clip = (await insertClip(server, await makePatternClip(path.join(gen, 'clip.mp4'), 3), project.id, admin.id)).clip;
  const worker = startTestRuntime(server);
  await worker.drain();
  await worker.close();
  fieldIndex = (await MotionField.findOne({ where: { clipId: clip.id, direction: 'forward' } }))!.fromIndex;
});
afterAll(() => server.close());

const curator = async () => (await signedInAgent(server, 'curator@example.test')).agent;

describe('strip pictures', () => {
  it.each(['frames/0', 'motion/FIELD'])('%s?height=34 is 34 pixels high, the aspect kept, as WebP', async (kind) => {
    const agent = await curator();
    const address = `/api/clips/${clip.id}/${kind.replace('FIELD', String(fieldIndex))}`;
    const full = await sharp(
      (await agent.get(address).buffer(true).parse(binary).expect(200)).body as Buffer,
    ).metadata();
    const small = await agent.get(`${address}?height=34`).buffer(true).parse(binary).expect(200);
    expect(small.headers['content-type']).toBe('image/webp');
    const shrunk = await sharp(small.body as Buffer).metadata();
    expect(shrunk.format).toBe('webp');
    expect(shrunk.height).toBe(34);
    // sharp rounds the width to the nearest pixel: full.width × 34 / full.height.
    expect(Math.abs(shrunk.width! - (full.width! * 34) / full.height!)).toBeLessThanOrEqual(1);
    expect((small.body as Buffer).length).toBeLessThan(full.size ?? Infinity);
  });

  it('has an ETag of its own, answered 304 when the browser has it', async () => {
    const agent = await curator();
    const address = `/api/clips/${clip.id}/frames/1`;
    const small = await agent.get(`${address}?height=68`).expect(200);
    const larger = await agent.get(`${address}?height=108`).expect(200);
    const full = await agent.get(address).expect(200);
    expect(new Set([small.headers.etag, larger.headers.etag, full.headers.etag]).size).toBe(3);
    await agent.get(`${address}?height=68`).set('If-None-Match', small.headers.etag!).expect(304);
  });

  it('refuses a height the strip does not draw, naming the ones it does', async () => {
    const agent = await curator();
    const { body } = await agent.get(`/api/clips/${clip.id}/frames/0?height=35`).expect(400);
    expect(body.error.message).toContain('height must be one of 34, 54, 68, 108');
    await agent.get(`/api/clips/${clip.id}/motion/${fieldIndex}?size=34`).expect(400);
  });

  it('is 404 for a frame the clip does not have, as the full frame is', async () => {
    const agent = await curator();
    await agent.get(`/api/clips/${clip.id}/frames/999?height=34`).expect(404);
  });
});
