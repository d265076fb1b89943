import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, MailOutbox, PasswordReset, User } from '../../server/core/models';
import { messagesTo, startTestMail, tokenFromLink } from '../helpers/mail';
import {
  TEST_PASSWORD,
  addUser,
  agentWithCsrf,
  signedInAgent,
  startTestServer,
  type TestServer,
} from '../helpers/test-server';

let server: TestServer;
let mail: Awaited<ReturnType<typeof startTestMail>>;

beforeAll(async () => {
  // The limits get their own server at the end of this file; here they must not get in the way.
  server = await startTestServer({ resetLimitPerIp: 1000, resetLimitPerAccount: 1000 });
  for (const role of ['operator', 'curator', 'engineer', 'admin'] as const) await addUser(server, role);
  mail = await startTestMail(server);
});
afterAll(async () => {
  await mail.stop();
  await server.close();
});

async function requestReset(email: string, target = server) {
  const { agent, csrf } = await agentWithCsrf(target);
  return agent.post('/api/auth/reset-request').set('x-csrf-token', csrf).send({ email });
}

async function submitReset(body: object) {
  const { agent, csrf } = await agentWithCsrf(server);
  return agent.post('/api/auth/reset').set('x-csrf-token', csrf).send(body);
}

/** The reset request is handled after the 202 goes out; wait until its link is written, then deliver it. */
async function resetTokenFor(user: User, links: number): Promise<string> {
  await expect.poll(() => PasswordReset.count({ where: { userId: user.id } }), { timeout: 5_000 }).toBe(links);
  await mail.deliver();
  const messages = await messagesTo(user.email);
  return tokenFromLink(messages.at(-1)!, server.config.publicUrl, '/reset-password/');
}

async function signInStatus(email: string, password: string): Promise<number> {
  const { agent, csrf } = await agentWithCsrf(server);
  return (await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send({ email, password })).status;
}

describe('POST /api/auth/reset-request', () => {
  it('answers 400 naming the field for bad input', async () => {
    const bad = await requestReset('not-an-address');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/^email/);
    const { agent, csrf } = await agentWithCsrf(server);
    const extra = await agent
      .post('/api/auth/reset-request')
      .set('x-csrf-token', csrf)
      .send({ email: 'operator@example.test', role: 'admin' })
      .expect(400);
    expect(extra.body.error.message).toMatch(/role/);
  });

  it('answers the same 202 whether or not the address has an account, and mails only a real one', async () => {
    const unknown = await requestReset('nobody-here@example.test');
    const known = await requestReset('OPERATOR@example.test');
    expect(unknown.status).toBe(202);
    expect(known.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    expect(known.body.message).toMatch(/If that address belongs to an active Kinefold account/);
    const operator = (await User.findByEmail('operator@example.test'))!;
    await resetTokenFor(operator, 1);
    const [message] = await messagesTo('operator@example.test');
    expect(message!.subject).toBe('Choose a new Kinefold password');
    expect(message!.text).toMatch(/Someone \(hopefully you\) asked/);
    expect(await messagesTo('nobody-here@example.test')).toHaveLength(0);
    expect(await MailOutbox.count({ where: { to: 'nobody-here@example.test' } })).toBe(0);
  });

  it('sends nothing to a disabled account', async () => {
    const disabled = await addUser(server, 'curator', 'disabled-reset@example.test');
    await disabled.update({ disabled: true });
    expect((await requestReset('disabled-reset@example.test')).status).toBe(202);
    await requestReset('engineer@example.test');
    await resetTokenFor((await User.findByEmail('engineer@example.test'))!, 1);
    expect(await PasswordReset.count({ where: { userId: disabled.id } })).toBe(0);
    expect(await MailOutbox.count({ where: { to: 'disabled-reset@example.test' } })).toBe(0);
  });
});

describe('POST /api/auth/reset', () => {
  it('answers 400 naming the field for bad input', async () => {
    for (const [body, field] of [
      [{ password: 'long-enough-passphrase' }, 'token'],
      [{ token: 'short', password: 'long-enough-passphrase' }, 'token'],
      [{ token: 'x'.repeat(43) }, 'password'],
      [{ token: 'x'.repeat(43), password: 'long-enough-passphrase', email: 'a@example.test' }, 'email'],
    ] as const) {
      const response = await submitReset(body);
      expect(response.status).toBe(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
  });

  it('answers 404 for a link that never existed', async () => {
    const response = await submitReset({ token: 'y'.repeat(43), password: 'long-enough-passphrase' });
    expect(response.status).toBe(404);
    expect(response.body.error.code).toBe('reset_link_not_found');
  });

  it('sets the new password once, ends every other session and refuses the link the second time', async () => {
    const curator = (await User.findByEmail('curator@example.test'))!;
    const elsewhere = await signedInAgent(server, 'curator@example.test');
    await requestReset('curator@example.test');
    const token = await resetTokenFor(curator, 1);

    const weak = await submitReset({ token, password: 'password1234' });
    expect(weak.status).toBe(400);
    expect(weak.body.error).toMatchObject({ code: 'weak_password', details: { field: 'password' } });
    expect(weak.body.error.message).toMatch(/too common/);
    const asEmail = await submitReset({ token, password: 'curator@example.test' });
    expect(asEmail.body.error.message).toMatch(/e-mail address/);
    expect(await signInStatus('curator@example.test', TEST_PASSWORD)).toBe(200);
    await elsewhere.agent.get('/api/me').expect(200);

    expect((await submitReset({ token, password: 'fresh-frames-at-noon' })).status).toBe(204);
    expect(await signInStatus('curator@example.test', TEST_PASSWORD)).toBe(401);
    expect(await signInStatus('curator@example.test', 'fresh-frames-at-noon')).toBe(200);
    await elsewhere.agent.get('/api/me').expect(401);
    expect(await AuditEvent.count({ where: { action: 'password.reset', targetId: String(curator.id) } })).toBe(1);
    expect((await PasswordReset.findOne({ where: { userId: curator.id } }))!.usedAt).toBeInstanceOf(Date);

    const again = await submitReset({ token, password: 'another-fresh-phrase' });
    expect(again.status).toBe(410);
    expect(again.body.error).toMatchObject({ code: 'reset_link_used' });
    expect(await signInStatus('curator@example.test', 'fresh-frames-at-noon')).toBe(200);
  });

  it('answers 410 for an expired link, and only the newest link of a person works', async () => {
    const engineer = (await User.findByEmail('engineer@example.test'))!;
    await PasswordReset.destroy({ where: { userId: engineer.id } });
    await requestReset('engineer@example.test');
    const first = await resetTokenFor(engineer, 1);
    await requestReset('engineer@example.test');
    const second = await resetTokenFor(engineer, 2);
    const superseded = await submitReset({ token: first, password: 'superseded-link-phrase' });
    expect(superseded.status).toBe(410);
    expect(superseded.body.error.code).toBe('reset_link_expired');
    await PasswordReset.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: engineer.id } });
    const expired = await submitReset({ token: second, password: 'too-late-to-reset-now' });
    expect(expired.status).toBe(410);
    expect(expired.body.error.message).toMatch(/expired/);
    expect(await signInStatus('engineer@example.test', TEST_PASSWORD)).toBe(200);
  });
});

describe('POST /api/users/:id/password-reset', () => {
  it('is 401 signed out and 403 for every role but admin', async () => {
    const operator = (await User.findByEmail('operator@example.test'))!;
    const { agent, csrf } = await agentWithCsrf(server);
    await agent.post(`/api/users/${operator.id}/password-reset`).set('x-csrf-token', csrf).expect(401);
    for (const role of ['operator', 'curator', 'engineer']) {
      const signedIn = await signedInAgent(
        server,
        `${role}@example.test`,
        role === 'curator' ? 'fresh-frames-at-noon' : TEST_PASSWORD,
      );
      await signedIn.agent
        .post(`/api/users/${operator.id}/password-reset`)
        .set('x-csrf-token', signedIn.csrf)
        .expect(403);
    }
  });

  it('answers 400 for a bad id and 404 for an unknown one', async () => {
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    const bad = await agent.post('/api/users/abc/password-reset').set('x-csrf-token', csrf).expect(400);
    expect(bad.body.error.message).toMatch(/^id/);
    await agent.post('/api/users/9999/password-reset').set('x-csrf-token', csrf).expect(404);
  });

  it('mails the person a link an admin asked for, and refuses a disabled account', async () => {
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    const admin = (await User.findByEmail('admin@example.test'))!;
    const target = await addUser(server, 'operator', 'forgetful@example.test');
    const sent = await agent.post(`/api/users/${target.id}/password-reset`).set('x-csrf-token', csrf).expect(202);
    expect(sent.body.email).toBe('forgetful@example.test');
    expect(Date.parse(sent.body.expiresAt) - Date.now()).toBeGreaterThan(59 * 60_000);
    const reset = await PasswordReset.findOne({ where: { userId: target.id } });
    expect(reset!.requestedById).toBe(admin.id);
    expect(
      await AuditEvent.count({
        where: { action: 'password.reset_link', actorId: admin.id, targetId: String(target.id) },
      }),
    ).toBe(1);
    await mail.deliver();
    const [message] = await messagesTo('forgetful@example.test');
    expect(message!.text).toMatch(/An admin asked Kinefold/);
    const token = tokenFromLink(message!, server.config.publicUrl, '/reset-password/');
    expect((await submitReset({ token, password: 'remembered-it-now-ok' })).status).toBe(204);

    await target.update({ disabled: true });
    const refused = await agent.post(`/api/users/${target.id}/password-reset`).set('x-csrf-token', csrf).expect(409);
    expect(refused.body.error.message).toMatch(/disabled/);
  });
});

// Last in the file: the models follow the newest test server, so nothing may use `server` after this starts one.
describe('reset-request limits', () => {
  let limited: TestServer;
  beforeAll(async () => {
    limited = await startTestServer({ resetLimitPerIp: 4, resetLimitPerAccount: 2 });
  });
  afterAll(() => limited.close());

  it('limit requests per e-mail address, found or not, and per network address, with a clear message', async () => {
    expect((await requestReset('someone@example.test', limited)).status).toBe(202);
    expect((await requestReset('someone@example.test', limited)).status).toBe(202);
    const perAddress = await requestReset('Someone@example.test', limited);
    expect(perAddress.status).toBe(429);
    expect(perAddress.body.error.code).toBe('too_many_reset_requests');
    expect(perAddress.body.error.message).toMatch(/Too many password-reset requests. Wait 60 minutes/);
    expect((await requestReset('other@example.test', limited)).status).toBe(202);
    expect((await requestReset('third@example.test', limited)).status).toBe(429);
  });
});
