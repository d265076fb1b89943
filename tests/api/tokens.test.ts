import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiToken, AuditEvent, User } from '../../server/core/models';
import { addPairsetClip } from '../helpers/pairset-clips';
import { buildPairsetNow } from '../helpers/pairset-build';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import {
  addUser,
  agentWithCsrf,
  signedInAgent,
  startTestServer,
  TEST_PASSWORD,
  type TestServer,
} from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

let server: TestServer;
let runtime: TestRuntime;
let pairsetId: number;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let engineer: Agent;

const TOKEN_SHAPE = /^kft_[0-9a-f]{8}_[A-Za-z0-9_-]{43}$/;

async function newToken(who: Agent, name: string): Promise<{ id: number; token: string; prefix: string }> {
  return (await who.agent.post('/api/tokens').set('x-csrf-token', who.csrf).send({ name }).expect(201)).body;
}

/** A request with only the token: no session cookie, no CSRF token. */
const bearer = (token: string) => ({
  get: (url: string) => request(server.app).get(url).set('Authorization', `Bearer ${token}`),
  post: (url: string, body?: object) =>
    request(server.app).post(url).set('Authorization', `Bearer ${token}`).send(body),
  delete: (url: string) => request(server.app).delete(url).set('Authorization', `Bearer ${token}`),
});

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  for (const role of ['operator', 'curator'] as const) await addUser(server, role);
  const owner = await addUser(server, 'engineer');
  await addUser(server, 'engineer', 'second@example.test');
  const admin = await addUser(server, 'admin');
  const project = await addProject(admin.id, 'ridge');
  for (let seed = 0; seed < 2; seed += 1) {
    await addPairsetClip(server, { projectId: project.id, uploaderId: admin.id, frames: 8, seed });
  }
  pairsetId = (await buildPairsetNow(runtime, owner, { projectIds: [project.id], split: { val: 0, seed: 1 } })).id;
  engineer = await signedInAgent(server, 'engineer@example.test');
});
afterAll(async () => {
  await runtime?.close();
  await server?.close();
});

describe('token routes', () => {
  it('answer 401 signed out and 403 to operators and curators', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    await agent.post('/api/tokens').set('x-csrf-token', csrf).send({ name: 'x' }).expect(401);
    await agent.get('/api/tokens').expect(401);
    await agent.delete('/api/tokens/1').set('x-csrf-token', csrf).expect(401);
    for (const role of ['operator', 'curator'] as const) {
      const { agent: who, csrf: token } = await signedInAgent(server, `${role}@example.test`);
      await who.post('/api/tokens').set('x-csrf-token', token).send({ name: 'x' }).expect(403);
      await who.get('/api/tokens').expect(403);
      await who.delete('/api/tokens/1').set('x-csrf-token', token).expect(403);
    }
  });

  it('refuse a bad body with 400 naming the field', async () => {
    const cases = [
      [{}, 'name'],
      [{ name: ' ' }, 'name'],
      [{ name: 'ok', scope: 'all' }, 'scope'],
    ] as const;
    for (const [body, field] of cases) {
      const response = await engineer.agent
        .post('/api/tokens')
        .set('x-csrf-token', engineer.csrf)
        .send(body)
        .expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    expect(
      (await engineer.agent.delete('/api/tokens/abc').set('x-csrf-token', engineer.csrf).expect(400)).body.error
        .message,
    ).toMatch(/^id/);
  });

  it('create a token shown once, stored only as a SHA-256 with a visible prefix', async () => {
    const created = await newToken(engineer, 'training box');
    expect(created.token).toMatch(TOKEN_SHAPE);
    expect(created.token.startsWith(`${created.prefix}_`)).toBe(true);
    const row = (await ApiToken.findByPk(created.id))!;
    expect(row.tokenHash).toBe(createHash('sha256').update(created.token).digest('hex'));
    expect(JSON.stringify(row.toJSON())).not.toContain(created.token.slice(13));
    const list = await engineer.agent.get('/api/tokens').expect(200);
    const listed = list.body.items.find((item: { id: number }) => item.id === created.id);
    expect(listed).toEqual({
      id: created.id,
      name: 'training box',
      prefix: created.prefix,
      lastUsedAt: null,
      revokedAt: null,
      createdAt: expect.any(String),
    });
    expect(await AuditEvent.count({ where: { action: 'token.create', targetId: String(created.id) } })).toBe(1);
  });

  it("list only the person's own tokens", async () => {
    const second = await signedInAgent(server, 'second@example.test');
    await newToken(second, 'someone else');
    const mine = await engineer.agent.get('/api/tokens').expect(200);
    expect(mine.body.items.map((item: { name: string }) => item.name)).not.toContain('someone else');
  });
});

describe('Authorization: Bearer', () => {
  it('reads and downloads pairsets without a session or CSRF token, and records the last use', async () => {
    const { id, token } = await newToken(engineer, 'curl');
    await bearer(token).get('/api/pairsets').expect(200);
    const detail = await bearer(token).get(`/api/pairsets/${pairsetId}`).expect(200);
    await bearer(token).get(`/api/pairsets/${pairsetId}/manifest`).expect(200);
    await bearer(token).get(`/api/pairsets/${pairsetId}/difficulty`).expect(200);
    const whole = await bearer(token).get(`/api/pairsets/${pairsetId}/shards/0`).buffer(true).parse(binary).expect(200);
    expect((whole.body as Buffer).length).toBe(detail.body.shards[0].bytes);
    const part = await bearer(token)
      .get(`/api/pairsets/${pairsetId}/shards/0`)
      .set('Range', 'bytes=0-511')
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect(part.body).toEqual((whole.body as Buffer).subarray(0, 512));
    expect((await ApiToken.findByPk(id))!.lastUsedAt).toBeInstanceOf(Date);
  });

  it('is refused with 403 on every other route, reads and writes alike', async () => {
    const { token } = await newToken(engineer, 'narrow');
    const attempts: [string, () => request.Test][] = [
      ['GET /api/me', () => bearer(token).get('/api/me')],
      ['GET /api/clips', () => bearer(token).get('/api/clips')],
      ['GET /api/tokens', () => bearer(token).get('/api/tokens')],
      ['POST /api/tokens', () => bearer(token).post('/api/tokens', { name: 'more' })],
      ['POST build', () => bearer(token).post(`/api/pairsets/${pairsetId}/build`)],
      ['POST new-version', () => bearer(token).post(`/api/pairsets/${pairsetId}/new-version`)],
      ['POST preview', () => bearer(token).post('/api/pairsets/preview', {})],
      ['DELETE pairset', () => bearer(token).delete(`/api/pairsets/${pairsetId}`)],
    ];
    for (const [what, send] of attempts) {
      const response = await send();
      expect([what, response.status, response.body.error.code]).toEqual([what, 403, 'token_not_allowed']);
    }
  });

  it('is ignored on the routes open to anyone, which answer as they do without it', async () => {
    const { token } = await newToken(engineer, 'default header');
    await bearer(token).get('/api/health').expect(200);
    const anonymous = await agentWithCsrf(server);
    const withToken = (test: request.Test) => test.set('Authorization', `Bearer ${token}`);
    const csrf = (await withToken(anonymous.agent.get('/api/auth/csrf')).expect(200)).body.token as string;
    const signIn = await withToken(anonymous.agent.post('/api/auth/sign-in').set('x-csrf-token', csrf))
      .send({ email: 'second@example.test', password: TEST_PASSWORD })
      .expect(200);
    expect(signIn.body.email).toBe('second@example.test');
    const other = await agentWithCsrf(server);
    await withToken(other.agent.post('/api/auth/reset-request').set('x-csrf-token', other.csrf))
      .send({ email: 'nobody@example.test' })
      .expect(202);
    const unknownCode = 'A'.repeat(43);
    expect((await withToken(other.agent.get(`/api/invitations/${unknownCode}`))).status).not.toBe(403);
    // Ignored means ignored: the token signs no one in there, and CSRF still guards the writes.
    await withToken(request(server.app).post('/api/auth/sign-in'))
      .send({ email: 'second@example.test', password: TEST_PASSWORD })
      .expect(403);
    expect((await bearer(token).get('/api/me')).status).toBe(403);
  });

  it('is 401 for an unknown, malformed or revoked token, and revoking twice is 409', async () => {
    const { id, token } = await newToken(engineer, 'to revoke');
    const unknown = `${token.slice(0, 13)}${'A'.repeat(43)}`;
    expect((await bearer(unknown).get('/api/pairsets').expect(401)).body.error.code).toBe('token_invalid');
    await bearer('not-a-token').get('/api/pairsets').expect(401);
    await request(server.app).get('/api/pairsets').set('Authorization', 'Basic abc').expect(401);
    await bearer(token).get('/api/pairsets').expect(200);
    const revoked = await engineer.agent.delete(`/api/tokens/${id}`).set('x-csrf-token', engineer.csrf).expect(200);
    expect(revoked.body.revokedAt).toEqual(expect.any(String));
    expect((await bearer(token).get(`/api/pairsets/${pairsetId}/shards/0`).expect(401)).body.error.code).toBe(
      'token_invalid',
    );
    await engineer.agent.delete(`/api/tokens/${id}`).set('x-csrf-token', engineer.csrf).expect(409);
    expect(await AuditEvent.count({ where: { action: 'token.revoke', targetId: String(id) } })).toBe(1);
  });

  it("cannot be revoked by another engineer, and follows its owner's role and account", async () => {
    const { id, token } = await newToken(engineer, 'follows owner');
    const second = await signedInAgent(server, 'second@example.test');
    await second.agent.delete(`/api/tokens/${id}`).set('x-csrf-token', second.csrf).expect(404);
    const owner = (await User.findByEmail('engineer@example.test'))!;
    await owner.update({ role: 'operator' });
    await bearer(token).get('/api/pairsets').expect(403);
    await owner.update({ role: 'engineer', disabled: true });
    await bearer(token).get('/api/pairsets').expect(401);
    await owner.update({ disabled: false });
    await bearer(token).get('/api/pairsets').expect(200);
  });
});

describe("an admin and everyone's tokens", () => {
  it("lists every person's tokens with their owner, and revokes another person's token", async () => {
    const admin = await signedInAgent(server, 'admin@example.test');
    const second = await signedInAgent(server, 'second@example.test');
    const theirs = await newToken(second, 'left on the lab machine');
    // Signed out 401, an engineer 403, a bad query 400.
    await request(server.app).get('/api/admin/tokens').expect(401);
    await engineer.agent.get('/api/admin/tokens').expect(403);
    await admin.agent.get('/api/admin/tokens?sort=owner').expect(400);

    const all = await admin.agent.get('/api/admin/tokens?pageSize=200').expect(200);
    expect(all.body.total).toBe(await ApiToken.count());
    const owners = new Set(all.body.items.map((item: { ownerEmail: string }) => item.ownerEmail));
    expect(owners).toEqual(new Set(['engineer@example.test', 'second@example.test']));
    expect(all.body.items.find((item: { id: number }) => item.id === theirs.id)).toMatchObject({
      name: 'left on the lab machine',
      ownerName: 'Test engineer',
      ownerEmail: 'second@example.test',
      revokedAt: null,
    });
    expect(JSON.stringify(all.body)).not.toContain(theirs.token);
    const secondId = (await User.findByEmail('second@example.test'))!.id;
    const narrowed = await admin.agent.get(`/api/admin/tokens?userId=${secondId}`).expect(200);
    expect(narrowed.body.items.every((item: { ownerId: number }) => item.ownerId === secondId)).toBe(true);

    await admin.agent.delete(`/api/tokens/${theirs.id}`).set('x-csrf-token', admin.csrf).expect(200);
    await bearer(theirs.token).get('/api/pairsets').expect(401);
    const audit = await AuditEvent.findOne({ where: { action: 'token.revoke', targetId: String(theirs.id) } });
    expect(audit!.detail).toMatchObject({ ownerId: secondId });
  });
});
