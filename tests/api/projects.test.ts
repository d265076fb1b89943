import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Project } from '../../server/core/models';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let admin: Awaited<ReturnType<typeof signedInAgent>>;
let operator: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'admin');
  await addUser(server, 'operator');
  admin = await signedInAgent(server, 'admin@example.test');
  operator = await signedInAgent(server, 'operator@example.test');
});
afterAll(() => server.close());

describe('projects', () => {
  it('are 401 signed out', async () => {
    await request(server.app).get('/api/projects').expect(401);
    await request(server.app).get('/api/projects/1').expect(401);
  });

  it('can be created and edited only by an admin', async () => {
    await operator.agent.post('/api/projects').set('x-csrf-token', operator.csrf).send({ name: 'Nope' }).expect(403);
    await operator.agent.patch('/api/projects/1').set('x-csrf-token', operator.csrf).send({ name: 'Nope' }).expect(403);
  });

  it('take documented defaults and answer 201', async () => {
    const response = await admin.agent.post('/api/projects').set('x-csrf-token', admin.csrf)
      .send({ name: 'Terrace rows', description: 'Spring pass', quotaBytes: 5_000_000 }).expect(201);
    expect(response.body).toMatchObject({
      name: 'Terrace rows', quotaBytes: 5_000_000, archived: false, usedBytes: 0, clipCount: 0,
      settings: { sampleFps: 5, workingSize: 320, deltas: [1, 2, 4], estimator: 'dis' },
    });
    expect(response.body.settings.flagThresholds.blurryLaplacianVariance).toBe(100);
    expect(await AuditEvent.count({ where: { action: 'project.create' } })).toBe(1);
  });

  it('refuse bad input with 400 naming the field, and a taken name with 409', async () => {
    const cases: [Record<string, unknown>, string][] = [
      [{}, 'name'],
      [{ name: 'X', quotaBytes: -1 }, 'quotaBytes'],
      [{ name: 'X', sampleFps: 0 }, 'sampleFps'],
      [{ name: 'X', deltas: [1, 1] }, 'deltas'],
      [{ name: 'X', estimator: 'magic' }, 'estimator'],
      [{ name: 'X', colour: 'red' }, 'colour'],
    ];
    for (const [body, field] of cases) {
      const response = await admin.agent.post('/api/projects').set('x-csrf-token', admin.csrf).send(body).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    const taken = await admin.agent.post('/api/projects').set('x-csrf-token', admin.csrf)
      .send({ name: 'Terrace rows' }).expect(409);
    expect(taken.body.error.message).toMatch(/already exists/);
  });

  it('are listed and opened by every signed-in role, and archived by an admin', async () => {
    const list = await operator.agent.get('/api/projects').expect(200);
    expect(list.body.total).toBe(1);
    const id = list.body.items[0].id as number;
    await operator.agent.get(`/api/projects/${id}`).expect(200);
    await operator.agent.get('/api/projects/999').expect(404);
    await operator.agent.get('/api/projects/abc').expect(400);
    const archived = await admin.agent.patch(`/api/projects/${id}`).set('x-csrf-token', admin.csrf)
      .send({ archived: true, quotaBytes: null }).expect(200);
    expect(archived.body).toMatchObject({ archived: true, quotaBytes: null });
    expect((await Project.findByPk(id))?.archived).toBe(true);
  });
});
