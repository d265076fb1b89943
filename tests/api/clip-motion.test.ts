import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Frame, MotionField } from '../../server/core/models';
import { decodeFlo } from '../../shared/motion/formats/flo';
import { MIN_CONSISTENT_SHARE } from '../../shared/motion/motion-scale';
import { CROP, cropFilter, makeCutClip, makeTexture, textureFileIn } from '../helpers/motion-clips';
import { addProject, insertClip } from '../helpers/pipeline-clips';
import { startTestRuntime } from '../helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

let server: TestServer;
/** A clip with two cuts that the real pipeline processed, and one still queued. */
let processed: Clip;
let queued: Clip;
let cutBefore: number[];
const UNKNOWN = 987_654;
const WORKING = { width: 320, height: 180 };
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer'] as const) await addUser(server, role);
  const adminId = (await addUser(server, 'admin')).id;
  const project = await addProject(adminId, 'motion', { sampleFps: 5, workingSize: WORKING.width });
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const texture = await makeTexture(textureFileIn(gen, 2), 1000, 420, 2);
  const file = await makeCutClip(path.join(gen, 'cut.mp4'), texture, 1.4, cropFilter('n*2', '30'));
  processed = (await insertClip(server, file, project.id, adminId)).clip;
  const worker = startTestRuntime(server);
  await worker.drain();
  await worker.close();
  await processed.reload();
  cutBefore = (await Frame.findAll({ where: { clipId: processed.id, cutBefore: true } })).map((frame) => frame.index);
  fs.copyFileSync(file, path.join(gen, 'other.mp4'));
  fs.appendFileSync(path.join(gen, 'other.mp4'), Buffer.from([1]));
  queued = (await insertClip(server, path.join(gen, 'other.mp4'), project.id, adminId)).clip;
});
afterAll(() => server.close());

const agentOf = async (role: string) => (await signedInAgent(server, `${role}@example.test`)).agent;

describe.each([
  ['motion picture', (id: number | string, index: number | string = 0) => `/api/clips/${id}/motion/${index}`],
  ['motion field', (id: number | string, index: number | string = 0) => `/api/clips/${id}/motion/${index}/flo`],
])('GET %s', (_name, url) => {
  it('is 401 signed out', async () => {
    const response = await request(server.app).get(url(processed.id)).expect(401);
    expect(response.body.error.code).toBeDefined();
  });

  it('is 400 naming the field for a bad id or index', async () => {
    const agent = await agentOf('curator');
    expect((await agent.get(url('abc')).expect(400)).body.error.message).toMatch(/^id/);
    expect((await agent.get(url(processed.id, -1)).expect(400)).body.error.message).toMatch(/^index/);
    expect((await agent.get(url(processed.id, 'one')).expect(400)).body.error.message).toMatch(/^index/);
  });

  it('is 404 for an unknown clip, a frame the clip does not have, and a clip not processed yet', async () => {
    const agent = await agentOf('curator');
    expect((await agent.get(url(UNKNOWN)).expect(404)).body.error.message).toContain(`${UNKNOWN}`);
    expect((await agent.get(url(processed.id, processed.frameCount!)).expect(404)).body.error.message).toBe(
      `Frame ${processed.frameCount} of clip ${processed.id} not found.`,
    );
    await agent.get(url(queued.id)).expect(404);
  });

  it('is 404 with the reason where a cut or the clip end leaves no field', async () => {
    const agent = await agentOf('curator');
    const last = processed.frameCount! - 1;
    const end = await agent.get(url(processed.id, last)).expect(404);
    expect(end.body.error).toMatchObject({ code: 'no_motion_field' });
    expect(end.body.error.message).toContain(`Frame ${last} is the last frame of clip ${processed.id}`);
    expect(cutBefore).toHaveLength(2);
    for (const index of cutBefore) {
      const cut = await agent.get(url(processed.id, index - 1)).expect(404);
      expect(cut.body.error.message).toBe(
        `A cut lies between frames ${index - 1} and ${index} of clip ` +
          `${processed.id}, and no motion field spans a cut.`,
      );
      await agent.get(url(processed.id, index)).expect(200);
    }
  });

  it('is 404 saying when fields are made, for frames the Motion stage has not reached', async () => {
    await Frame.bulkCreate([0, 1].map((index) => ({ clipId: queued.id, index, timeS: index / 5 })));
    try {
      const message = (await (await agentOf('engineer')).get(url(queued.id)).expect(404)).body.error.message;
      expect(message).toContain('fields are made after the signals stage');
    } finally {
      await Frame.destroy({ where: { clipId: queued.id } });
    }
  });
});

describe('GET /api/clips/:id/motion/:index', () => {
  it('answers the colour picture of the forward field as a PNG at the working size, to every role', async () => {
    for (const role of ['operator', 'curator', 'engineer', 'admin']) {
      const response = await (
        await agentOf(role)
      )
        .get(`/api/clips/${processed.id}/motion/2`)
        .buffer(true)
        .parse(binary)
        .expect(200);
      expect(response.headers['content-type']).toBe('image/png');
      const body = response.body as Buffer;
      expect(body.subarray(0, 8)).toEqual(PNG_SIGNATURE);
      expect(await sharp(body).metadata()).toMatchObject({ format: 'png', ...WORKING, channels: 3 });
    }
  });
});

describe('GET /api/clips/:id/motion/:index/flo', () => {
  it('answers the forward field as Middlebury .flo: PIEH, width, height, 12 + 8wh bytes', async () => {
    const response = await (
      await agentOf('engineer')
    )
      .get(`/api/clips/${processed.id}/motion/2/flo`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    expect(response.headers['content-type']).toBe('application/octet-stream');
    expect(response.headers['content-disposition']).toBe(`attachment; filename="clip-${processed.id}-motion-2.flo"`);
    const body = response.body as Buffer;
    // CHECK-VALUES §1 (Middlebury flow-code): tag bytes 50 49 45 48, int32 LE width and height, size 12 + 8wh.
    expect([...body.subarray(0, 4)]).toEqual([0x50, 0x49, 0x45, 0x48]);
    expect(body.readFloatLE(0)).toBe(202021.25);
    expect([body.readInt32LE(4), body.readInt32LE(8)]).toEqual([WORKING.width, WORKING.height]);
    expect(body.length).toBe(12 + 8 * WORKING.width * WORKING.height);
    // The field is the one the row summarises, stored to 1/64 px: each component within 1/128 px, so each
    // magnitude within √2/128 px.
    const { flow } = decodeFlo(body);
    let sum = 0;
    for (let i = 0; i < flow.length; i += 2) sum += Math.hypot(flow[i]!, flow[i + 1]!);
    const row = await MotionField.findOne({ where: { clipId: processed.id, fromIndex: 2, direction: 'forward' } });
    expect(Math.abs(sum / (flow.length / 2) - row!.meanMagnitude)).toBeLessThanOrEqual(Math.SQRT2 / 128);
  });

  it('serves byte ranges', async () => {
    const response = await (
      await agentOf('engineer')
    )
      .get(`/api/clips/${processed.id}/motion/2/flo`)
      .set('Range', 'bytes=0-11')
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect((response.body as Buffer).subarray(0, 4).toString('latin1')).toBe('PIEH');
    expect((response.body as Buffer).length).toBe(12);
  });
});

describe('GET /api/clips/:id/frames with motion', () => {
  it('gives each frame the summary of its forward field, null before a cut and at the end, and the scale', async () => {
    const { body } = await (await agentOf('curator')).get(`/api/clips/${processed.id}/frames`).expect(200);
    const forward = await MotionField.findAll({ where: { clipId: processed.id, direction: 'forward' } });
    const byFrame = new Map(forward.map((field) => [field.fromIndex, field]));
    expect(body.items).toHaveLength(processed.frameCount!);
    for (const item of body.items as { index: number; motion: unknown }[]) {
      const field = byFrame.get(item.index);
      expect(item.motion).toEqual(
        field
          ? {
              meanMagnitude: field.meanMagnitude,
              p95Magnitude: field.p95Magnitude,
              consistentShare: field.consistentShare,
            }
          : null,
      );
    }
    const withoutField = body.items
      .filter((item: { motion: unknown }) => item.motion === null)
      .map((item: { index: number }) => item.index);
    expect(withoutField).toEqual([...cutBefore.map((index) => index - 1), processed.frameCount! - 1]);
    // The pan's content moves 2 source px a frame × 5 frames a step × 320/640 = 5 px a step [C]; 0.2 px is the
    // tolerance measured in tests/worker/motion-stage.test.ts.
    const panStep = 2 * 5 * (WORKING.width / CROP.width);
    expect(Math.abs(body.items[1].motion.meanMagnitude - panStep)).toBeLessThan(0.2);
    // The scale is the pan's speed: the moving test pattern between the cuts gives mostly inconsistent fields
    // (measured 34–48 % consistent), which are left out; no field crosses a cut (the pipeline made none).
    const inconsistent = forward.filter((field) => field.consistentShare < MIN_CONSISTENT_SHARE).length;
    expect(inconsistent).toBeGreaterThan(0);
    expect(body.motionScale).toMatchObject({ acrossCut: 0, inconsistent, consistentOnly: true });
    expect(body.motionScale.fieldCount + body.motionScale.outliers).toBe(forward.length - inconsistent);
    expect(Math.abs(body.motionScale.pxPerStep - panStep)).toBeLessThan(0.2);
  });

  it('leaves a field across a cut of the frames table out of the scale and says so', async () => {
    // As when a cut is marked after the fields were estimated: a wild field into the frame after the first cut.
    const across = await MotionField.create({
      clipId: processed.id,
      fromIndex: cutBefore[0]! - 1,
      toIndex: cutBefore[0]!,
      direction: 'forward',
      estimator: 'farneback',
      params: {},
      meanMagnitude: 40,
      p95Magnitude: 67.3,
      consistentP95Magnitude: 55,
      consistentShare: 0.9,
      medianU: 40,
      medianV: 0,
      maxMagnitude: 90,
    });
    try {
      const { body } = await (await agentOf('curator')).get(`/api/clips/${processed.id}/frames`).expect(200);
      expect(body.motionScale.acrossCut).toBe(1);
      expect(body.motionScale.pxPerStep).toBeLessThan(10);
    } finally {
      await across.destroy();
    }
  });

  it('has no motion and no scale for a clip not processed yet', async () => {
    const { body } = await (await agentOf('curator')).get(`/api/clips/${queued.id}/frames`).expect(200);
    expect(body).toEqual({ items: [], total: 0, motionScale: null });
  });
});
