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
    const response = await admin.agent
      .post('/api/projects')
      .set('x-csrf-token', admin.csrf)
      .send({ name: 'Terrace rows', description: 'Spring pass', quotaBytes: 5_000_000 })
      .expect(201);
    expect(response.body).toMatchObject({
      name: 'Terrace rows',
      quotaBytes: 5_000_000,
      archived: false,
      usedBytes: 0,
      clipCount: 0,
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
    const taken = await admin.agent
      .post('/api/projects')
      .set('x-csrf-token', admin.csrf)
      .send({ name: 'Terrace rows' })
      .expect(409);
    expect(taken.body.error.message).toMatch(/already exists/);
  });

  it('check processing settings when saved: a typo or an impossible value is 400 naming the field', async () => {
    const post = (body: Record<string, unknown>) =>
      admin.agent
        .post('/api/projects')
        .set('x-csrf-token', admin.csrf)
        .send({ name: 'Settings check', ...body });
    const refused: [Record<string, unknown>, string][] = [
      [{ estimator: 'farneback', estimatorParams: { winsize: 9 } }, 'estimatorParams.winsize: is not a parameter'],
      [{ estimator: 'farneback', estimatorParams: { pyrScale: 1 } }, 'estimatorParams.pyrScale: must be in \\(0, 1\\)'],
      [{ estimatorParams: { patchSize: 1 } }, 'estimatorParams.patchSize: must be an integer in 2..32'],
      [{ flagThresholds: { darkMeanLumma: 30 } }, 'flagThresholds.darkMeanLumma'],
      [{ flagThresholds: { darkMeanLuma: 300 } }, 'flagThresholds.darkMeanLuma: must be in 0..255'],
      [{ flagThresholds: { cutThreshold: 0 } }, 'flagThresholds.cutThreshold'],
    ];
    for (const [body, message] of refused) {
      const response = await post(body).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${message}`));
    }
    expect(await Project.count({ where: { name: 'Settings check' } })).toBe(0);

    const created = await post({ estimator: 'farneback', estimatorParams: { winSize: 9 } }).expect(201);
    const patch = (body: Record<string, unknown>) =>
      admin.agent.patch(`/api/projects/${created.body.id}`).set('x-csrf-token', admin.csrf).send(body);
    // Changing the estimator alone would leave farneback's parameters on dis: refused, nothing saved.
    const switched = await patch({ estimator: 'dis' }).expect(400);
    expect(switched.body.error.message).toMatch(/^estimatorParams\.winSize: is not a parameter of dis/);
    await patch({ flagThresholds: { shakyJiter: 2 } }).expect(400);
    await patch({ estimator: 'dis', estimatorParams: { patchStride: 4 } }).expect(200);
    const saved = await Project.findByPk(created.body.id);
    expect(saved).toMatchObject({ estimator: 'dis', estimatorParams: { patchStride: 4 } });
    await saved!.destroy();
  });

  it('check the flag defaults for new projects when saved', async () => {
    const current = await admin.agent.get('/api/settings').expect(200);
    const response = await admin.agent
      .put('/api/settings')
      .set('x-csrf-token', admin.csrf)
      .send({ ...current.body, projectFlagDefaults: { blurryLaplacianVarience: 80 } })
      .expect(400);
    expect(response.body.error.message).toMatch(/^projectFlagDefaults\.blurryLaplacianVarience/);
  });

  it('are listed and opened by every signed-in role, and archived by an admin', async () => {
    const list = await operator.agent.get('/api/projects').expect(200);
    expect(list.body.total).toBe(1);
    const id = list.body.items[0].id as number;
    await operator.agent.get(`/api/projects/${id}`).expect(200);
    await operator.agent.get('/api/projects/999').expect(404);
    await operator.agent.get('/api/projects/abc').expect(400);
    const archived = await admin.agent
      .patch(`/api/projects/${id}`)
      .set('x-csrf-token', admin.csrf)
      .send({ archived: true, quotaBytes: null })
      .expect(200);
    expect(archived.body).toMatchObject({ archived: true, quotaBytes: null });
    expect((await Project.findByPk(id))?.archived).toBe(true);
  });
});
