import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { Session, User } from '../../server/core/models';
import {
  TEST_PASSWORD,
  addUser,
  agentWithCsrf,
  appWith,
  signedInAgent,
  startTestServer,
  type TestServer,
} from '../helpers/test-server';

let server: TestServer;

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'admin');
  await addUser(server, 'operator');
  const disabled = await addUser(server, 'curator', 'disabled@example.test');
  await disabled.update({ disabled: true });
});
afterAll(() => server.close());

function sessionCookie(setCookie: string[] | string | undefined): string | undefined {
  const cookies = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  return cookies.find((cookie) => cookie.startsWith('kinefold.sid='))?.split(';')[0];
}

describe('sign-in', () => {
  it('signs in with the right password, answers the user and changes the session id', async () => {
    const agent = request.agent(server.app);
    const before = await agent.get('/api/auth/csrf').expect(200);
    const beforeCookie = sessionCookie(before.headers['set-cookie']);
    const response = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', before.body.token)
      .send({ email: 'OPERATOR@example.test', password: TEST_PASSWORD })
      .expect(200);
    expect(response.body).toMatchObject({ email: 'operator@example.test', role: 'operator' });
    expect(response.body.passwordHash).toBeUndefined();
    const afterCookie = sessionCookie(response.headers['set-cookie']);
    expect(afterCookie).toBeDefined();
    expect(afterCookie).not.toEqual(beforeCookie);
    expect(response.headers['set-cookie']?.toString()).toMatch(/HttpOnly/i);
    expect(response.headers['set-cookie']?.toString()).toMatch(/SameSite=Lax/i);
    const me = await agent.get('/api/me').expect(200);
    expect(me.body.email).toBe('operator@example.test');
    expect((await User.findByEmail('operator@example.test'))?.lastSignInAt).toBeInstanceOf(Date);
  });

  it('refuses a wrong password with 401 and a plain message', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    const response = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', csrf)
      .send({ email: 'operator@example.test', password: 'not-the-password' })
      .expect(401);
    expect(response.body.error).toEqual({ code: 'wrong_credentials', message: 'E-mail address or password is wrong.' });
    await agent.get('/api/me').expect(401);
  });

  it('refuses an unknown address with the same answer as a wrong password', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    const response = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', csrf)
      .send({ email: 'nobody@example.test', password: TEST_PASSWORD })
      .expect(401);
    expect(response.body.error.code).toBe('wrong_credentials');
  });

  it('refuses a disabled user with 403 and says why', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    const response = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', csrf)
      .send({ email: 'disabled@example.test', password: TEST_PASSWORD })
      .expect(403);
    expect(response.body.error.message).toMatch(/disabled/);
  });

  it('answers 400 naming the field for a malformed body, and refuses unknown fields', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    const bad = await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email: 'x', password: 'y' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/^email:/);
    const extra = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', csrf)
      .send({ email: 'operator@example.test', password: TEST_PASSWORD, role: 'admin' });
    expect(extra.status).toBe(400);
    expect(extra.body.error.message).toMatch(/role/);
  });

  it('answers 400 for a body that is not JSON', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    const response = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', csrf)
      .set('Content-Type', 'application/json')
      .send('{"email":');
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('invalid_json');
  });
});

describe('CSRF', () => {
  it('refuses a state-changing request without the token with 403', async () => {
    const { agent } = await agentWithCsrf(server);
    const response = await agent
      .post('/api/auth/sign-in')
      .send({ email: 'operator@example.test', password: TEST_PASSWORD })
      .expect(403);
    expect(response.body.error.code).toBe('csrf_invalid');
  });

  it('refuses a token from another session', async () => {
    const other = await agentWithCsrf(server);
    const { agent } = await agentWithCsrf(server);
    await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', other.csrf)
      .send({ email: 'operator@example.test', password: TEST_PASSWORD })
      .expect(403);
  });

  it('stores nothing for a signed-out visitor however often the token is asked for', async () => {
    const before = await Session.count();
    for (let i = 0; i < 200; i += 1) await request(server.app).get('/api/auth/csrf').expect(200);
    expect(await Session.count()).toBe(before);
    const visitor = await agentWithCsrf(server);
    await visitor.agent.get('/api/auth/csrf').expect(200);
    expect(await Session.count()).toBe(before);
  });

  it("writes a signed-in session's rolling expiry back at most once a minute, not on every request", async () => {
    const { agent } = await signedInAgent(server, 'admin@example.test');
    const rows = await Session.findAll({ where: { userId: (await User.findByEmail('admin@example.test'))!.id } });
    const newest = rows.sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime())[0]!;
    const written = newest.updatedAt.getTime();
    for (let i = 0; i < 10; i += 1) await agent.get('/api/me').expect(200);
    await newest.reload();
    expect(newest.updatedAt.getTime()).toBe(written);
  });

  it('protects sign-out too', async () => {
    const { agent } = await signedInAgent(server, 'operator@example.test');
    await agent.post('/api/auth/sign-out').expect(403);
    await agent.get('/api/me').expect(200);
  });
});

describe('sign-out and sessions', () => {
  it('destroys the session', async () => {
    const { agent, csrf } = await signedInAgent(server, 'operator@example.test');
    await agent.post('/api/auth/sign-out').set('x-csrf-token', csrf).expect(204);
    await agent.get('/api/me').expect(401);
  });

  it("stops a disabled user's existing session at once", async () => {
    const user = await addUser(server, 'engineer', 'soon-disabled@example.test');
    const { agent } = await signedInAgent(server, 'soon-disabled@example.test');
    await agent.get('/api/me').expect(200);
    await user.update({ disabled: true });
    const response = await agent.get('/api/me').expect(401);
    expect(response.body.error.code).toBe('sign_in_required');
  });
});

describe('rate limits', () => {
  it('answers 429 with a clear message after too many failed attempts on one account', async () => {
    const limited = appWith(server, { signInLimitPerAccount: 3 });
    try {
      const { agent, csrf } = await agentWithCsrf(limited);
      const attempt = () =>
        agent
          .post('/api/auth/sign-in')
          .set('x-csrf-token', csrf)
          .send({ email: 'operator@example.test', password: 'wrong-password-guess' });
      for (let i = 0; i < 3; i += 1) expect((await attempt()).status).toBe(401);
      const blocked = await attempt();
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.code).toBe('too_many_sign_in_attempts');
      expect(blocked.body.error.message).toMatch(/Too many sign-in attempts/);
    } finally {
      limited.close();
    }
  });

  it('answers 429 after too many attempts from one address, whatever the account', async () => {
    const limited = appWith(server, { signInLimitPerIp: 2 });
    try {
      const { agent, csrf } = await agentWithCsrf(limited);
      for (const email of ['a@example.test', 'b@example.test']) {
        await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email, password: 'x' }).expect(401);
      }
      await agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', csrf)
        .send({ email: 'c@example.test', password: 'x' })
        .expect(429);
    } finally {
      limited.close();
    }
  });
});

describe('security headers', () => {
  it('sends helmet headers without HSTS when TLS is off', async () => {
    const { agent } = await agentWithCsrf(server);
    const response = await agent.get('/api/health');
    expect(response.headers['x-content-type-options']).toBe('nosniff');
    expect(response.headers['strict-transport-security']).toBeUndefined();
    expect(response.headers['content-security-policy']).not.toMatch(/upgrade-insecure-requests/);
  });

  it('adds HSTS, upgrade-insecure-requests and secure cookies when TLS is on', async () => {
    const tls = appWith(server, { tls: true });
    try {
      const { agent } = await agentWithCsrf(tls);
      const response = await agent.get('/api/health').set('X-Forwarded-Proto', 'https');
      expect(response.headers['strict-transport-security']).toMatch(/max-age/);
      expect(response.headers['content-security-policy']).toMatch(/upgrade-insecure-requests/);
      const csrf = await request(tls.app).get('/api/auth/csrf').set('X-Forwarded-Proto', 'https');
      expect(String(csrf.headers['set-cookie'])).toMatch(/Secure/);
    } finally {
      tls.close();
    }
  });
});
