import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Session, User } from '../../server/core/models';
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
const ROLES = ['operator', 'curator', 'engineer', 'admin'] as const;

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ROLES) await addUser(server, role);
});
afterAll(() => server.close());

async function signInStatus(email: string, password: string): Promise<number> {
  const { agent, csrf } = await agentWithCsrf(server);
  return (await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email, password })).status;
}

describe('PATCH /api/me', () => {
  it('is 401 signed out', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    await agent.patch('/api/me').set('x-csrf-token', csrf).send({ name: 'Someone' }).expect(401);
  });

  it('answers 400 naming the field for bad input, and refuses fields a person may not set', async () => {
    const { agent, csrf } = await signedInAgent(server, 'operator@example.test');
    for (const [body, field] of [
      [{ name: '' }, 'name'],
      [{}, 'name'],
      [{ name: 'x'.repeat(201) }, 'name'],
      [{ name: 'Tove', role: 'admin' }, 'role'],
      [{ name: 'Tove', quotaBytes: null }, 'quotaBytes'],
    ] as const) {
      const response = await agent.patch('/api/me').set('x-csrf-token', csrf).send(body).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    expect((await User.findByEmail('operator@example.test'))!.role).toBe('operator');
  });

  it('lets every role rename themselves, and records the change', async () => {
    for (const role of ROLES) {
      const { agent, csrf } = await signedInAgent(server, `${role}@example.test`);
      const response = await agent
        .patch('/api/me')
        .set('x-csrf-token', csrf)
        .send({ name: `  New ${role} ` })
        .expect(200);
      expect(response.body).toMatchObject({ name: `New ${role}`, role, email: `${role}@example.test` });
      const user = (await User.findByEmail(`${role}@example.test`))!;
      expect(user.name).toBe(`New ${role}`);
      const event = await AuditEvent.findOne({ where: { action: 'user.update', targetId: String(user.id) } });
      expect(event!.actorId).toBe(user.id);
      expect(event!.detail).toEqual({ changes: { name: { from: `Test ${role}`, to: `New ${role}` } } });
      expect((await agent.get('/api/me').expect(200)).body.name).toBe(`New ${role}`);
    }
  });
});

describe('POST /api/me/password', () => {
  it('is 401 signed out', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    await agent
      .post('/api/me/password')
      .set('x-csrf-token', csrf)
      .send({ currentPassword: TEST_PASSWORD, password: 'a-new-long-passphrase' })
      .expect(401);
  });

  it('answers 400 naming the field for a bad body', async () => {
    const { agent, csrf } = await signedInAgent(server, 'curator@example.test');
    for (const [body, field] of [
      [{ password: 'a-new-long-passphrase' }, 'currentPassword'],
      [{ currentPassword: TEST_PASSWORD }, 'password'],
      [{ currentPassword: TEST_PASSWORD, password: 'a-new-long-passphrase', userId: 1 }, 'userId'],
    ] as const) {
      const response = await agent.post('/api/me/password').set('x-csrf-token', csrf).send(body).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
  });

  it('needs the current password and applies the password rule, changing nothing when refused', async () => {
    const { agent, csrf } = await signedInAgent(server, 'curator@example.test');
    const change = (currentPassword: string, password: string) =>
      agent.post('/api/me/password').set('x-csrf-token', csrf).send({ currentPassword, password });
    const wrong = await change('not-my-password', 'a-new-long-passphrase');
    expect(wrong.status).toBe(400);
    expect(wrong.body.error).toMatchObject({ code: 'wrong_password', details: { field: 'currentPassword' } });
    const cases: [password: string, message: RegExp][] = [
      ['short-one', /at least 12 characters/],
      ['curator@example.test', /e-mail address/],
      ['Kinefold1234', /too common/],
      [TEST_PASSWORD, /same as the current one/],
    ];
    for (const [password, message] of cases) {
      const response = await change(TEST_PASSWORD, password);
      expect(response.status).toBe(400);
      expect(response.body.error.details).toEqual({ field: 'password' });
      expect(response.body.error.message).toMatch(message);
    }
    expect(await signInStatus('curator@example.test', TEST_PASSWORD)).toBe(200);
  });

  it('changes the password, keeps this session and ends the others', async () => {
    const here = await signedInAgent(server, 'engineer@example.test');
    const elsewhere = await signedInAgent(server, 'engineer@example.test');
    const engineer = (await User.findByEmail('engineer@example.test'))!;
    const sessionsBefore = await Session.count({ where: { userId: engineer.id } });
    await here.agent
      .post('/api/me/password')
      .set('x-csrf-token', here.csrf)
      .send({ currentPassword: TEST_PASSWORD, password: 'shards-and-manifests-07' })
      .expect(204);
    await here.agent.get('/api/me').expect(200);
    await elsewhere.agent.get('/api/me').expect(401);
    expect(await Session.count({ where: { userId: engineer.id } })).toBe(1);
    expect(await signInStatus('engineer@example.test', TEST_PASSWORD)).toBe(401);
    expect(await signInStatus('engineer@example.test', 'shards-and-manifests-07')).toBe(200);
    const event = await AuditEvent.findOne({ where: { action: 'password.change', targetId: String(engineer.id) } });
    expect(event!.detail).toEqual({ sessionsEnded: sessionsBefore - 1 });
  });
});

describe('POST /api/me/password limits', () => {
  it('answers 429 after the account limit of refused changes, even with the right password, per person', async () => {
    const limited = appWith(server, { signInLimitPerAccount: 2 });
    try {
      const signedIn = async (email: string) => {
        const { agent, csrf } = await signedInAgent(limited, email);
        return (currentPassword: string) =>
          agent
            .post('/api/me/password')
            .set('x-csrf-token', csrf)
            .send({ currentPassword, password: 'rows-of-pear-trees-09' });
      };
      const operator = await signedIn('operator@example.test');
      expect((await operator('guess-number-one')).status).toBe(400);
      expect((await operator('guess-number-two')).status).toBe(400);
      const blocked = await operator(TEST_PASSWORD);
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.code).toBe('too_many_password_attempts');
      expect(await signInStatus('operator@example.test', TEST_PASSWORD)).toBe(200);
      // Someone else's attempts are their own.
      const admin = await signedIn('admin@example.test');
      expect((await admin('guess-number-one')).status).toBe(400);
    } finally {
      limited.close();
    }
  });
});

describe('GET /api/me/storage', () => {
  it('is 401 signed out', async () => {
    const { agent } = await agentWithCsrf(server);
    await agent.get('/api/me/storage').expect(401);
  });

  it('tells every role what their clips hold against their own quota', async () => {
    const operator = (await User.findByEmail('operator@example.test'))!;
    await operator.update({ quotaBytes: 5 * 1024 ** 3 });
    for (const role of ROLES) {
      const { agent } = await signedInAgent(
        server,
        `${role}@example.test`,
        role === 'engineer' ? 'shards-and-manifests-07' : TEST_PASSWORD,
      );
      const response = await agent.get('/api/me/storage').expect(200);
      expect(response.body).toEqual({ usedBytes: 0, quotaBytes: role === 'operator' ? 5 * 1024 ** 3 : null });
    }
  });
});
