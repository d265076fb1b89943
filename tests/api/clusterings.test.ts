import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Job } from '../../server/core/models';
import { addProject } from '../helpers/pipeline-clips';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let engineer: Awaited<ReturnType<typeof signedInAgent>>;
let curator: Awaited<ReturnType<typeof signedInAgent>>;
let projectId: number;

beforeAll(async () => {
  server = await startTestServer();
  const admin = await addUser(server, 'admin');
  await addUser(server, 'engineer');
  await addUser(server, 'curator');
  engineer = await signedInAgent(server, 'engineer@example.test');
  curator = await signedInAgent(server, 'curator@example.test');
  projectId = (await addProject(admin.id, 'Terraces')).id;
});
afterAll(() => server.close());

describe('clusterings', () => {
  it('are 401 signed out and 403 for roles other than engineer and admin', async () => {
    await request(server.app).get('/api/clusterings').expect(401);
    await request(server.app).get('/api/clips/1/similar').expect(401);
    await curator.agent.get('/api/clusterings').expect(403);
    await curator.agent
      .post('/api/clusterings')
      .set('x-csrf-token', curator.csrf)
      .send({ projectIds: [1] })
      .expect(403);
  });

  it('refuse a bad body with 400 naming the field, and an unknown project with 404', async () => {
    const post = (body: object) =>
      engineer.agent.post('/api/clusterings').set('x-csrf-token', engineer.csrf).send(body);
    expect((await post({ projectIds: [] }).expect(400)).body.error.message).toMatch(/^projectIds: /);
    expect((await post({ projectIds: [projectId], k: 1 }).expect(400)).body.error.message).toMatch(/^k: .*2\.\.50/);
    expect((await post({ projectIds: [projectId], restarts: 99 }).expect(400)).body.error.message).toMatch(
      /^restarts: /,
    );
    await post({ projectIds: [projectId + 1000] }).expect(404);
  });

  it('queue a cluster-moments job (202), then list and show the clustering', async () => {
    const created = await engineer.agent
      .post('/api/clusterings')
      .set('x-csrf-token', engineer.csrf)
      .send({ projectIds: [projectId], k: 3 })
      .expect(202);
    expect(created.body).toMatchObject({ projectIds: [projectId], state: 'queued' });
    expect(await Job.count({ where: { kind: 'cluster-moments', state: 'queued' } })).toBe(1);
    const listed = await engineer.agent.get(`/api/clusterings?projectId=${projectId}`).expect(200);
    expect(listed.body.map((row: { id: number }) => row.id)).toContain(created.body.id);
    await engineer.agent.get(`/api/clusterings/${created.body.id}`).expect(200);
    await engineer.agent.get('/api/clusterings/99999').expect(404);
  });

  it('answer similar clips for any signed-in role, 404 for an unknown clip', async () => {
    await curator.agent.get('/api/clips/99999/similar').expect(404);
  });
});
