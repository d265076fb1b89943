import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Job } from '../../server/core/models';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { startTestRuntime } from '../helpers/pipeline-runtime';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

let server: TestServer;
/** A clip the real pipeline processed, and one still queued (nothing derived yet). */
let processed: Clip;
let queued: Clip;
let adminId: number;
const UNKNOWN = 987_654;
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer'] as const) await addUser(server, role);
  adminId = (await addUser(server, 'admin')).id;
  const project = await addProject(adminId, 'media');
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const file = await makePatternClip(path.join(gen, 'clip.mp4'), 3);
  processed = (await insertClip(server, file, project.id, adminId)).clip;
  const worker = startTestRuntime(server);
  await worker.drain();
  await worker.close();
  await processed.reload();
  fs.copyFileSync(file, path.join(gen, 'other.mp4'));
  fs.appendFileSync(path.join(gen, 'other.mp4'), Buffer.from([1]));
  queued = (await insertClip(server, path.join(gen, 'other.mp4'), project.id, adminId)).clip;
});
afterAll(() => server.close());

const curator = () => signedInAgent(server, 'curator@example.test');

describe.each([
  ['frames', (id: number | string) => `/api/clips/${id}/frames`],
  ['frame image', (id: number | string) => `/api/clips/${id}/frames/0`],
  ['luma view', (id: number | string) => `/api/clips/${id}/views/0/luma`],
  ['chroma view', (id: number | string) => `/api/clips/${id}/views/0/chroma`],
  ['thumbnail', (id: number | string) => `/api/clips/${id}/thumbnail`],
  ['preview', (id: number | string) => `/api/clips/${id}/preview`],
  ['progress', (id: number | string) => `/api/clips/${id}/progress`],
])('GET %s', (_name, url) => {
  it('is 401 signed out', async () => {
    await request(server.app).get(url(processed.id)).expect(401);
  });

  it('is 400 naming the id for a bad one, and 404 for an unknown clip', async () => {
    const { agent } = await curator();
    const bad = await agent.get(url('abc')).expect(400);
    expect(bad.body.error.message).toMatch(/^id/);
    const unknown = await agent.get(url(UNKNOWN)).expect(404);
    expect(unknown.body.error.message).toContain(`${UNKNOWN}`);
  });
});

describe('GET /api/clips/:id/frames', () => {
  it('lists every frame with its signals and forward motion, in order (motion: tests/api/clip-motion)', async () => {
    const { agent } = await curator();
    const { body } = await agent.get(`/api/clips/${processed.id}/frames`).expect(200);
    expect(body.total).toBe(processed.frameCount);
    expect(body.items.map((frame: { index: number }) => frame.index)).toEqual([...Array(processed.frameCount).keys()]);
    expect(Object.keys(body.items[0]).sort()).toEqual([
      'clippedShare',
      'contrast',
      'cutBefore',
      'index',
      'meanLuma',
      'motion',
      'sharpness',
      'timeS',
    ]);
    expect(body.items[1]).toMatchObject({ index: 1, timeS: 0.2, cutBefore: false });
    expect(body.items[1].sharpness).toBeGreaterThan(0);
  });

  it('is an empty list for a clip not processed yet', async () => {
    const { agent } = await curator();
    expect((await agent.get(`/api/clips/${queued.id}/frames`).expect(200)).body).toEqual({
      items: [],
      total: 0,
      motionScale: null,
    });
  });
});

describe('GET /api/clips/:id/frames/:index and /views/:index/:view', () => {
  it('answer the frame as stored (lossless WebP) and each view as a PNG made from it', async () => {
    const { agent } = await curator();
    const frame = await agent.get(`/api/clips/${processed.id}/frames/1`).buffer(true).parse(binary).expect(200);
    expect(frame.headers['content-type']).toBe('image/webp');
    // RIFF container with the WEBP form type, "VP8L" for the lossless bitstream (WebP container specification).
    const body = frame.body as Buffer;
    expect([body.toString('latin1', 0, 4), body.toString('latin1', 8, 12), body.toString('latin1', 12, 16)]).toEqual([
      'RIFF',
      'WEBP',
      'VP8L',
    ]);
    for (const url of ['views/1/luma', 'views/1/chroma']) {
      const response = await agent.get(`/api/clips/${processed.id}/${url}`).buffer(true).parse(binary).expect(200);
      expect(response.headers['content-type']).toBe('image/png');
      expect((response.body as Buffer).subarray(0, 8)).toEqual(PNG_SIGNATURE);
    }
  });

  it('are 400 for a bad index or view name', async () => {
    const { agent } = await curator();
    expect((await agent.get(`/api/clips/${processed.id}/frames/-1`).expect(400)).body.error.message).toMatch(/^index/);
    expect((await agent.get(`/api/clips/${processed.id}/frames/one`).expect(400)).body.error.message).toMatch(/^index/);
    expect((await agent.get(`/api/clips/${processed.id}/views/0/motion`).expect(400)).body.error.message).toMatch(
      /^view/,
    );
  });

  it('are 400 for a number written any other way than decimal digits, never another frame', async () => {
    const { agent } = await curator();
    for (const index of ['0x1', '1e0', '1.0', '+1', '%201']) {
      const response = await agent.get(`/api/clips/${processed.id}/frames/${index}`).expect(400);
      expect(response.body.error.message).toMatch(/^index/);
    }
    expect(
      (await agent.get(`/api/clips/0x${processed.id.toString(16)}/preview`).expect(400)).body.error.message,
    ).toMatch(/^id/);
  });

  it('refuse query fields the address does not take', async () => {
    const { agent } = await curator();
    for (const url of ['preview?file=../../db/kinefold.sqlite', 'thumbnail?x=1']) {
      const response = await agent.get(`/api/clips/${processed.id}/${url}`).expect(400);
      expect(response.body.error.code).toBe('invalid_input');
      expect(response.body.error.message).toMatch(/this address takes no query fields/);
    }
    // A frame takes `height` (the strip's small copies) and nothing else.
    const frame = await agent.get(`/api/clips/${processed.id}/frames/0?size=9999`).expect(400);
    expect(frame.body.error.code).toBe('invalid_input');
    expect(frame.body.error.message).toMatch(/size/);
  });

  it('are 404 for a frame the clip does not have', async () => {
    const { agent } = await curator();
    await agent.get(`/api/clips/${processed.id}/frames/${processed.frameCount}`).expect(404);
    await agent.get(`/api/clips/${processed.id}/views/${processed.frameCount}/luma`).expect(404);
    await agent.get(`/api/clips/${queued.id}/frames/0`).expect(404);
  });
});

describe('GET /api/clips/:id/thumbnail and /preview', () => {
  it('answer the thumbnail as JPEG and the preview as MP4', async () => {
    const { agent } = await curator();
    const thumbnail = await agent.get(`/api/clips/${processed.id}/thumbnail`).buffer(true).parse(binary).expect(200);
    expect(thumbnail.headers['content-type']).toBe('image/jpeg');
    const preview = await agent.get(`/api/clips/${processed.id}/preview`).buffer(true).parse(binary).expect(200);
    expect(preview.headers['content-type']).toBe('video/mp4');
    expect(preview.headers['accept-ranges']).toBe('bytes');
  });

  it('answers a Range of the preview with 206 and just those bytes', async () => {
    const { agent } = await curator();
    const whole = (await agent.get(`/api/clips/${processed.id}/preview`).buffer(true).parse(binary)).body as Buffer;
    const part = await agent
      .get(`/api/clips/${processed.id}/preview`)
      .set('Range', 'bytes=100-199')
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect(part.headers['content-range']).toBe(`bytes 100-199/${whole.length}`);
    expect(part.body).toEqual(whole.subarray(100, 200));
  });

  it('are 404 while the clip has not been sampled', async () => {
    const { agent } = await curator();
    await agent.get(`/api/clips/${queued.id}/thumbnail`).expect(404);
    await agent.get(`/api/clips/${queued.id}/preview`).expect(404);
  });
});

describe('GET /api/clips/:id/progress', () => {
  it('tells the state, the stage and the share of it done', async () => {
    const { agent } = await curator();
    expect((await agent.get(`/api/clips/${processed.id}/progress`).expect(200)).body).toEqual({
      state: 'awaiting_review',
      stage: null,
      progress: 1,
    });
    expect((await agent.get(`/api/clips/${queued.id}/progress`).expect(200)).body).toEqual({
      state: 'queued',
      stage: null,
      progress: 0,
    });
  });
});

describe('GET /api/clips/:id', () => {
  it('includes the counts, flag details and whether a thumbnail and preview exist', async () => {
    const { agent } = await curator();
    const { body } = await agent.get(`/api/clips/${processed.id}`).expect(200);
    expect(body).toMatchObject({
      state: 'awaiting_review',
      stage: null,
      frameCount: processed.frameCount,
      cutCount: 0,
      flags: [],
      flagDetails: [],
      hasThumbnail: true,
      hasPreview: true,
    });
    expect(body.medianSharpness).toBeGreaterThan(0);
  });
});

describe('POST /api/clips/:id/reprocess', () => {
  it('is 401 signed out and 403 for every role but admin', async () => {
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent.post(`/api/clips/${processed.id}/reprocess`).set('x-csrf-token', anonymous.csrf).expect(401);
    for (const role of ['operator', 'curator', 'engineer']) {
      const { agent, csrf } = await signedInAgent(server, `${role}@example.test`);
      const response = await agent.post(`/api/clips/${processed.id}/reprocess`).set('x-csrf-token', csrf).expect(403);
      expect(response.body.error.code).toBe('forbidden');
    }
  });

  it('is 400 for a bad id and 404 for an unknown clip', async () => {
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    await agent.post('/api/clips/0/reprocess').set('x-csrf-token', csrf).expect(400);
    await agent.post(`/api/clips/${UNKNOWN}/reprocess`).set('x-csrf-token', csrf).expect(404);
  });

  it('queues the clip again for an admin, keeping its verdict, and refuses a second time while queued', async () => {
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    await processed.update({ state: 'rejected' });
    const response = await agent.post(`/api/clips/${processed.id}/reprocess`).set('x-csrf-token', csrf).expect(202);
    expect(response.body).toEqual({ state: 'rejected', stage: null, progress: 0 });
    expect(await Job.count({ where: { clipId: processed.id, state: 'queued', kind: 'process-clip' } })).toBe(1);
    const again = await agent.post(`/api/clips/${processed.id}/reprocess`).set('x-csrf-token', csrf).expect(409);
    expect(again.body.error.code).toBe('already_processing');
  });

  it('is 410 for a clip whose footage was purged', async () => {
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    await queued.update({ purgedAt: new Date() });
    await Job.update({ state: 'cancelled' }, { where: { clipId: queued.id } });
    await agent.post(`/api/clips/${queued.id}/reprocess`).set('x-csrf-token', csrf).expect(410);
  });
});
