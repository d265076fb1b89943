import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, CutMark, Frame } from '../../server/core/models';
import { validMoments } from '../../shared/pairing/pairing-graph';
import type { ClipCutList, FrameCut } from '../../shared/types/cuts';
import { cropFilter, makeCutClip, makeTexture, textureFileIn } from '../helpers/motion-clips';
import { addProject, insertClip } from '../helpers/pipeline-clips';
import { startTestRuntime } from '../helpers/pipeline-runtime';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * Cuts through the real pipeline (a pan, a hard cut to ffmpeg's test pattern, the pan again) and curators' marks:
 * GET /api/clips/:id/cuts, PUT and DELETE /api/clips/:id/cuts/:index.
 */

let server: TestServer;
let clip: Clip;
let queued: Clip;
let detected: number[];
const UNKNOWN = 987_654;

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer'] as const) await addUser(server, role);
  const adminId = (await addUser(server, 'admin')).id;
  const project = await addProject(adminId, 'cuts', { sampleFps: 5, workingSize: 320 });
  const gen = path.join(server.storageDir, 'generated');
  fs.mkdirSync(gen);
  const texture = await makeTexture(textureFileIn(gen, 4), 1000, 420, 4);
  const file = await makeCutClip(path.join(gen, 'cut.mp4'), texture, 1.4, cropFilter('n*2', '30'));
  clip = (await insertClip(server, file, project.id, adminId)).clip;
  const worker = startTestRuntime(server);
  await worker.drain();
  await worker.close();
  await clip.reload();
  detected = (await Frame.findAll({ where: { clipId: clip.id, cutBefore: true }, order: [['index', 'ASC']] })).map(
    (frame) => frame.index,
  );
  fs.copyFileSync(file, path.join(gen, 'other.mp4'));
  fs.appendFileSync(path.join(gen, 'other.mp4'), Buffer.from([1]));
  queued = (await insertClip(server, path.join(gen, 'other.mp4'), project.id, adminId)).clip;
}, 300_000);
afterAll(() => server.close());

const agentOf = (role: string) => signedInAgent(server, `${role}@example.test`);

describe('cut detection in the pipeline', () => {
  it('finds the two hard cuts (7 sampled frames a shot) and stores the evidence on every frame', async () => {
    // 1.4 s a shot at 5 frames/s: the new shots begin at frames 7 and 14, give or take one sampled frame.
    expect(detected).toHaveLength(2);
    expect(Math.abs(detected[0]! - 7)).toBeLessThanOrEqual(1);
    expect(Math.abs(detected[1]! - 14)).toBeLessThanOrEqual(1);
    expect(clip.cutCount).toBe(2);
    const frames = await Frame.findAll({ where: { clipId: clip.id }, order: [['index', 'ASC']] });
    expect(frames[0]!.cutEvidence).toBeNull();
    for (const frame of frames.slice(1)) {
      expect(frame.cutEvidence!.kind).toBe(detected.includes(frame.index) ? 'hard' : null);
    }
    expect(frames[detected[0]!]!.cutEvidence!.fired.warp).toBeGreaterThan(0);
  });
});

describe('GET /api/clips/:id/cuts', () => {
  it('is 401 signed out, 400 for a bad id and 404 for an unknown clip', async () => {
    await request(server.app).get(`/api/clips/${clip.id}/cuts`).expect(401);
    const { agent } = await agentOf('operator');
    expect((await agent.get('/api/clips/abc/cuts').expect(400)).body.error.message).toMatch(/^id/);
    await agent.get(`/api/clips/${UNKNOWN}/cuts`).expect(404);
  });

  it('explains each detected cut: which evidence fired, the values and the local level', async () => {
    const { agent } = await agentOf('operator');
    const { items } = (await agent.get(`/api/clips/${clip.id}/cuts`).expect(200)).body as ClipCutList;
    const cuts = items.filter((item) => item.cutBefore);
    expect(cuts.map((item) => item.index)).toEqual(detected);
    for (const cut of cuts) {
      expect(cut).toMatchObject({ detected: true, mark: null });
      expect(cut.evidence!.warpError).toBeGreaterThanOrEqual(cut.evidence!.fired.warp!);
      expect(cut.evidence!.localWarpError).toBeLessThan(cut.evidence!.warpError);
    }
  });
});

describe('PUT and DELETE /api/clips/:id/cuts/:index', () => {
  const url = (index: number | string, id: number | string = clip.id) => `/api/clips/${id}/cuts/${index}`;

  it('is 401 signed out and 403 for operators and engineers', async () => {
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent.put(url(3)).set('x-csrf-token', anonymous.csrf).send({ value: 'cut' }).expect(401);
    for (const role of ['operator', 'engineer']) {
      const { agent, csrf } = await agentOf(role);
      await agent.put(url(3)).set('x-csrf-token', csrf).send({ value: 'cut' }).expect(403);
      await agent.delete(url(3)).set('x-csrf-token', csrf).expect(403);
    }
  });

  it('is 400 for a bad value, an unknown field or the first frame, 404 for an unknown frame or clip', async () => {
    const { agent, csrf } = await agentOf('curator');
    const put = (path: string, body: object) => agent.put(path).set('x-csrf-token', csrf).send(body);
    expect((await put(url(3), { value: 'maybe' }).expect(400)).body.error.message).toMatch(/value/);
    await put(url(3), { value: 'cut', extra: 1 }).expect(400);
    expect((await put(url(0), { value: 'cut' }).expect(400)).body.error.message).toMatch(/first frame/);
    await put(url(9999), { value: 'cut' }).expect(404);
    await put(url(3, UNKNOWN), { value: 'cut' }).expect(404);
    expect(await CutMark.count()).toBe(0);
  });

  it('is 409 on a clip not measured yet, writing nothing', async () => {
    const { agent, csrf } = await agentOf('curator');
    await agent.put(url(1, queued.id)).set('x-csrf-token', csrf).send({ value: 'cut' }).expect(404);
    await Frame.create({ clipId: queued.id, index: 0, timeS: 0 });
    await Frame.create({ clipId: queued.id, index: 1, timeS: 0.2 });
    const response = await agent.put(url(1, queued.id)).set('x-csrf-token', csrf).send({ value: 'cut' }).expect(409);
    expect(response.body.error.message).toMatch(/not been through cut detection/);
    expect(await CutMark.count()).toBe(0);
  });

  it('adds a cut by hand: the frame, the count, the pairing and the audit trail follow at once', async () => {
    const { agent, csrf } = await agentOf('curator');
    const response = await agent.put(url(3)).set('x-csrf-token', csrf).send({ value: 'cut' }).expect(200);
    const body = response.body as FrameCut;
    expect(body).toMatchObject({ index: 3, detected: false, cutBefore: true, mark: { value: 'cut' } });
    expect((await Frame.findOne({ where: { clipId: clip.id, index: 3 } }))!.cutBefore).toBe(true);
    expect((await clip.reload()).cutCount).toBe(3);
    // The next pairset build pairs by these frames: no frame~neighbour+1 pair reaches across frame 3 any more.
    const frames = (await Frame.findAll({ where: { clipId: clip.id } })).map((frame) => ({
      index: frame.index,
      cutBefore: frame.cutBefore,
    }));
    const moments = validMoments(frames, { kind: 'frame~neighbour+1', a: 'frame', b: 'neighbour+1' });
    expect(moments).not.toContain(2);
    expect(moments).toContain(1);
    const event = await AuditEvent.findOne({ where: { action: 'clip.cut_mark' }, order: [['id', 'DESC']] });
    expect(event).toMatchObject({ targetType: 'clip', targetId: String(clip.id) });
    expect(event!.detail).toEqual({ frame: 3, value: 'cut', detected: false, cutBefore: false });
  });

  it('removes a detected cut by hand, and restores it when the mark is taken away', async () => {
    const { agent, csrf } = await agentOf('curator');
    const at = detected[0]!;
    await agent.put(url(at)).set('x-csrf-token', csrf).send({ value: 'none' }).expect(200);
    expect((await Frame.findOne({ where: { clipId: clip.id, index: at } }))!.cutBefore).toBe(false);
    const listed = (await agent.get(`/api/clips/${clip.id}/cuts`).expect(200)).body as ClipCutList;
    expect(listed.items.find((item) => item.index === at)).toMatchObject({
      detected: true,
      cutBefore: false,
      mark: { value: 'none', byName: expect.any(String) },
    });
    const cleared = (await agent.delete(url(at)).set('x-csrf-token', csrf).expect(200)).body as FrameCut;
    expect(cleared).toMatchObject({ detected: true, cutBefore: true, mark: null });
    expect((await Frame.findOne({ where: { clipId: clip.id, index: at } }))!.cutBefore).toBe(true);
    expect(await AuditEvent.count({ where: { action: 'clip.cut_mark_clear' } })).toBe(1);
    await agent.delete(url(at)).set('x-csrf-token', csrf).expect(404);
  });

  it('keeps marks when the clip is processed again', async () => {
    const { agent, csrf } = await agentOf('admin');
    await agent
      .post(`/api/clips/${clip.id}/reprocess`)
      .set('x-csrf-token', csrf)
      .expect((res) => {
        expect(res.status).toBeLessThan(300);
      });
    const worker = startTestRuntime(server);
    await worker.drain();
    await worker.close();
    expect((await Frame.findOne({ where: { clipId: clip.id, index: 3 } }))!.cutBefore).toBe(true);
    expect((await Frame.findOne({ where: { clipId: clip.id, index: 3 } }))!.cutEvidence!.kind).toBeNull();
  }, 300_000);
});
