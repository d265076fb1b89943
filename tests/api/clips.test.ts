import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findClip } from '../../server/core/clips/clips';
import { AuditEvent, Clip, Job, Project, User, Verdict } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { makeTestClip } from '../helpers/media-fixtures';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let otherOperator: SignedIn;
let admin: SignedIn;
let curator: SignedIn;
let projectId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-clips-'));
const ids: number[] = [];

async function uploadAs(as: SignedIn, file: string, fields: Record<string, string>) {
  let req = as.agent.post('/api/clips').set('x-csrf-token', as.csrf).field('projectId', String(projectId));
  for (const [key, value] of Object.entries(fields)) req = req.field(key, value);
  const response = await req.attach('file', file).expect(201);
  return response.body.id as number;
}

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'operator');
  await addUser(server, 'operator', 'second-operator@example.test');
  await addUser(server, 'admin');
  await addUser(server, 'curator');
  operator = await signedInAgent(server, 'operator@example.test');
  otherOperator = await signedInAgent(server, 'second-operator@example.test');
  admin = await signedInAgent(server, 'admin@example.test');
  curator = await signedInAgent(server, 'curator@example.test');
  projectId = (
    await Project.create({
      name: 'Terraces',
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1],
      flagThresholds: {},
    })
  ).id;
  ids.push(
    await uploadAs(operator, await makeTestClip(media, 'north-row.mp4', { seed: 1 }), {
      site: 'North terrace',
      tags: 'rows,dawn',
      capturedAt: '2026-03-01T06:00:00Z',
      notes: 'mist over the rows',
    }),
  );
  ids.push(
    await uploadAs(operator, await makeTestClip(media, 'south-row.mp4', { seed: 2, seconds: 3 }), {
      site: 'South terrace',
      tags: 'rows',
      capturedAt: '2026-03-02T06:00:00Z',
    }),
  );
  ids.push(
    await uploadAs(otherOperator, await makeTestClip(media, 'creek.mp4', { seed: 3 }), {
      site: 'Creek bank',
      tags: 'water',
      capturedAt: '2026-03-05T06:00:00Z',
    }),
  );
}, 120_000);
afterAll(async () => {
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('GET /api/clips', () => {
  it('is 401 signed out and 400 for unknown filters', async () => {
    await request(server.app).get('/api/clips').expect(401);
    const bad = await curator.agent.get('/api/clips?colour=red').expect(400);
    expect(bad.body.error.message).toMatch(/colour/);
    await curator.agent.get('/api/clips?state=lost').expect(400);
  });

  it('filters by uploader, site, tag, captured-at range and text, for any role', async () => {
    const byUploader = await curator.agent.get(`/api/clips?uploaderId=${(await Clip.findByPk(ids[2]))!.uploaderId}`);
    expect(byUploader.body.items.map((clip: { id: number }) => clip.id)).toEqual([ids[2]]);
    const bySite = await curator.agent.get('/api/clips?site=South%20terrace');
    expect(bySite.body.total).toBe(1);
    const byTag = await curator.agent.get('/api/clips?tag=rows');
    expect(byTag.body.total).toBe(2);
    const range = await curator.agent.get(
      '/api/clips?capturedFrom=2026-03-01T12:00:00Z&capturedTo=2026-03-04T00:00:00Z',
    );
    expect(range.body.items.map((clip: { id: number }) => clip.id)).toEqual([ids[1]]);
    const text = await curator.agent.get('/api/clips?q=mist');
    expect(text.body.items.map((clip: { id: number }) => clip.id)).toEqual([ids[0]]);
  });

  it('pages and sorts', async () => {
    const page = await curator.agent.get('/api/clips?sort=durationS&pageSize=1&page=3').expect(200);
    expect(page.body).toMatchObject({ total: 3, page: 3, pageSize: 1 });
    expect(page.body.items[0].id).toBe(ids[1]);
  });

  it('answers each clip byte for byte as the clip record itself reads, verdict and curator included', async () => {
    // The list reads plain rows (core/clips/clip-page.ts); the clip's model with its relations is the reference.
    const reviewer = (await User.findByEmail('curator@example.test'))!;
    const verdict = await Verdict.create({
      clipId: ids[1]!,
      curatorId: reviewer.id,
      decision: 'reject',
      reason: 'blurred',
      reasonLabel: 'Out of focus',
      comment: 'soft all through',
      bulk: true,
      at: new Date('2026-03-06T09:30:00.123Z'),
    });
    try {
      const page = await curator.agent.get('/api/clips?pageSize=10').expect(200);
      expect(page.body.items.map((clip: { id: number }) => clip.id)).toEqual([...ids].reverse());
      for (const item of page.body.items as { id: number }[]) {
        expect(JSON.stringify(item)).toBe(JSON.stringify((await findClip(item.id)).toApi()));
      }
      const judged = page.body.items.find((clip: { id: number }) => clip.id === ids[1]);
      expect(judged.verdict).toMatchObject({ decision: 'reject', curatorName: 'Test curator', bulk: true });
    } finally {
      await verdict.destroy();
    }
  });
});

describe('GET /api/clips/:id', () => {
  it('shows probe, metadata, history and what the viewer may do', async () => {
    const mine = await operator.agent.get(`/api/clips/${ids[0]}`).expect(200);
    expect(mine.body).toMatchObject({
      originalName: 'north-row.mp4',
      can: { edit: true, withdraw: true, delete: false },
    });
    expect(mine.body.history[0]).toMatchObject({ action: 'clip.upload', actorName: 'Test operator' });
    const theirs = await otherOperator.agent.get(`/api/clips/${ids[0]}`).expect(200);
    expect(theirs.body.can).toEqual({ edit: false, withdraw: false, delete: false });
    await operator.agent.get('/api/clips/9999').expect(404);
    await operator.agent.get('/api/clips/x').expect(400);
  });
});

describe('PATCH /api/clips/:id', () => {
  it('lets the uploader edit capture metadata before review, and records it', async () => {
    const response = await operator.agent
      .patch(`/api/clips/${ids[0]}`)
      .set('x-csrf-token', operator.csrf)
      .send({ site: 'North terrace, row 7', tags: ['rows', 'fog'] })
      .expect(200);
    expect(response.body).toMatchObject({ site: 'North terrace, row 7', tags: ['rows', 'fog'] });
    expect(response.body.history.at(-1).action).toBe('clip.edit');
  });

  it('refuses other operators, reviewed clips for the uploader, and bad fields', async () => {
    await otherOperator.agent
      .patch(`/api/clips/${ids[0]}`)
      .set('x-csrf-token', otherOperator.csrf)
      .send({ site: 'x' })
      .expect(403);
    await Clip.update({ state: 'accepted' }, { where: { id: ids[1] } });
    await operator.agent
      .patch(`/api/clips/${ids[1]}`)
      .set('x-csrf-token', operator.csrf)
      .send({ site: 'x' })
      .expect(403);
    await admin.agent.patch(`/api/clips/${ids[1]}`).set('x-csrf-token', admin.csrf).send({ site: 'Fixed' }).expect(200);
    const bad = await operator.agent
      .patch(`/api/clips/${ids[0]}`)
      .set('x-csrf-token', operator.csrf)
      .send({ capturedAt: 'yesterday' })
      .expect(400);
    expect(bad.body.error.message).toMatch(/^capturedAt/);
  });
});

describe('GET /api/clips/:id/source', () => {
  it('streams the source with Range support', async () => {
    const full = await curator.agent.get(`/api/clips/${ids[0]}/source`).buffer(true).parse(binary).expect(200);
    expect(full.headers['accept-ranges']).toBe('bytes');
    const part = await curator.agent
      .get(`/api/clips/${ids[0]}/source`)
      .set('Range', 'bytes=10-19')
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect(part.headers['content-range']).toBe(`bytes 10-19/${(full.body as Buffer).length}`);
    expect(part.body).toEqual((full.body as Buffer).subarray(10, 20));
  });
});

describe('DELETE /api/clips/:id', () => {
  it('lets the uploader withdraw before review: rows, files and usage go, the audit stays', async () => {
    const dir = storagePaths(server.storageDir).clipDir(ids[0]!);
    expect(fs.existsSync(dir)).toBe(true);
    await otherOperator.agent.delete(`/api/clips/${ids[0]}`).set('x-csrf-token', otherOperator.csrf).expect(403);
    await operator.agent.delete(`/api/clips/${ids[0]}`).set('x-csrf-token', operator.csrf).expect(204);
    expect(await Clip.findByPk(ids[0])).toBeNull();
    expect(await Job.count({ where: { clipId: ids[0] } })).toBe(0);
    expect(fs.existsSync(dir)).toBe(false);
    expect(await AuditEvent.count({ where: { action: 'clip.withdraw', targetId: String(ids[0]) } })).toBe(1);
    const project = await operator.agent.get(`/api/projects/${projectId}`).expect(200);
    expect(project.body.clipCount).toBe(2);
  });

  it('refuses the uploader once reviewed; an admin deletes any clip', async () => {
    const refused = await operator.agent.delete(`/api/clips/${ids[1]}`).set('x-csrf-token', operator.csrf).expect(403);
    expect(refused.body.error.message).toMatch(/reviewed; only an admin/);
    await admin.agent.delete(`/api/clips/${ids[1]}`).set('x-csrf-token', admin.csrf).expect(204);
    expect(await AuditEvent.count({ where: { action: 'clip.delete' } })).toBe(1);
  });
});
