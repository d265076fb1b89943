import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer', 'admin'] as const) await addUser(server, role);
});
afterAll(() => server.close());

describe('GET /api/health', () => {
  it('says the database is reachable and gives the version, signed out', async () => {
    const response = await request(server.app).get('/api/health').expect(200);
    expect(response.body).toEqual({
      status: 'ok',
      database: 'reachable',
      version: expect.stringMatching(/^\d+\.\d+\.\d+/),
    });
  });
});

describe('unknown API routes', () => {
  it('answer 404 in the error body, not HTML', async () => {
    const response = await request(server.app).get('/api/no-such-thing').expect(404);
    expect(response.headers['content-type']).toMatch(/json/);
    expect(response.body.error.code).toBe('not_found');
  });
});

describe('GET /api/me', () => {
  it('is 401 signed out', async () => {
    const response = await request(server.app).get('/api/me').expect(401);
    expect(response.body.error).toMatchObject({ code: 'sign_in_required' });
  });

  it('answers every role with itself', async () => {
    for (const role of ['operator', 'curator', 'engineer', 'admin']) {
      const { agent } = await signedInAgent(server, `${role}@example.test`);
      const response = await agent.get('/api/me').expect(200);
      expect(response.body).toMatchObject({ role, email: `${role}@example.test` });
    }
  });
});

describe('GET /api/users', () => {
  it('is 401 signed out', async () => {
    await request(server.app).get('/api/users').expect(401);
  });

  it('is 403 for every role but admin', async () => {
    for (const role of ['operator', 'curator', 'engineer']) {
      const { agent } = await signedInAgent(server, `${role}@example.test`);
      const response = await agent.get('/api/users').expect(403);
      expect(response.body.error.code).toBe('forbidden');
    }
  });

  it('answers 400 naming the field for bad paging, sorting or unknown filters', async () => {
    const { agent } = await signedInAgent(server, 'admin@example.test');
    for (const [query, field] of [
      ['pageSize=500', 'pageSize'],
      ['page=0', 'page'],
      ['sort=passwordHash', 'sort'],
      ['colour=red', 'colour'],
    ]) {
      const response = await agent.get(`/api/users?${query}`).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
  });

  it('lists users with paging, sorting and search for an admin', async () => {
    const { agent } = await signedInAgent(server, 'admin@example.test');
    const page = await agent.get('/api/users?pageSize=2&page=2&sort=-email').expect(200);
    expect(page.body).toMatchObject({ total: 4, page: 2, pageSize: 2 });
    expect(page.body.items.map((user: { email: string }) => user.email)).toEqual([
      'curator@example.test',
      'admin@example.test',
    ]);
    const search = await agent.get('/api/users?search=engin').expect(200);
    expect(search.body.items).toHaveLength(1);
    expect(search.body.items[0]).not.toHaveProperty('passwordHash');
    const byRole = await agent.get('/api/users?role=curator').expect(200);
    expect(byRole.body.total).toBe(1);
  });
});
