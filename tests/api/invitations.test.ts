import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Invitation, MailOutbox, User } from '../../server/core/models';
import { messagesTo, startTestMail, tokenFromLink } from '../helpers/mail';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let admin: User;

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer'] as const) await addUser(server, role);
  admin = await addUser(server, 'admin');
  mail = await startTestMail(server);
});
afterAll(async () => {
  await mail.stop();
  await server.close();
});

async function adminAgent() {
  return signedInAgent(server, 'admin@example.test');
}

/** Invites `email` as the admin and returns the invitation and the token from the mail it caused. */
async function invite(email: string, role = 'curator') {
  const { agent, csrf } = await adminAgent();
  const response = await agent.post('/api/invitations').set('x-csrf-token', csrf).send({ email, role }).expect(201);
  await mail.deliver();
  const messages = await messagesTo(email);
  return { invitation: response.body, token: tokenFromLink(messages.at(-1)!, server.config.publicUrl, '/invite/') };
}

async function accept(token: string, body: object) {
  const { agent, csrf } = await agentWithCsrf(server);
  const response = await agent.post(`/api/invitations/${token}/accept`).set('x-csrf-token', csrf).send(body);
  return { agent, response };
}

describe('admin-only invitation routes', () => {
  const routes: [method: 'get' | 'post', path: string][] = [
    ['get', '/api/invitations'],
    ['post', '/api/invitations'],
    ['post', '/api/invitations/1/resend'],
    ['post', '/api/invitations/1/revoke'],
  ];

  it('are 401 signed out', async () => {
    for (const [method, path] of routes) {
      const { agent, csrf } = await agentWithCsrf(server);
      const response = await agent[method](path).set('x-csrf-token', csrf).send({});
      expect(response.status, `${method} ${path}`).toBe(401);
    }
  });

  it('are 403 for every role but admin', async () => {
    for (const role of ['operator', 'curator', 'engineer']) {
      const { agent, csrf } = await signedInAgent(server, `${role}@example.test`);
      for (const [method, path] of routes) {
        const response = await agent[method](path).set('x-csrf-token', csrf).send({ email: 'x@example.test', role });
        expect(response.status, `${role} ${method} ${path}`).toBe(403);
      }
    }
    expect(await Invitation.count({ where: { email: 'x@example.test' } })).toBe(0);
  });

  it('answer 400 naming the field for bad input', async () => {
    const { agent, csrf } = await adminAgent();
    const cases: [body: object, field: string][] = [
      [{ email: 'not-an-address', role: 'curator' }, 'email'],
      [{ email: 'someone@example.test', role: 'boss' }, 'role'],
      [{ email: 'someone@example.test' }, 'role'],
      [{ email: 'someone@example.test', role: 'curator', name: 'Someone' }, 'name'],
    ];
    for (const [body, field] of cases) {
      const response = await agent.post('/api/invitations').set('x-csrf-token', csrf).send(body).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    const badId = await agent.post('/api/invitations/abc/resend').set('x-csrf-token', csrf).expect(400);
    expect(badId.body.error.message).toMatch(/^id/);
    const badState = await agent.get('/api/invitations?state=lost').expect(400);
    expect(badState.body.error.message).toMatch(/^state/);
    expect(await Invitation.count({ where: { email: 'someone@example.test' } })).toBe(0);
  });
});

describe('the invitation journey', () => {
  it('invites, mails a one-time link, accepts it once and signs the person in', async () => {
    const { agent, csrf } = await adminAgent();
    const created = await agent
      .post('/api/invitations')
      .set('x-csrf-token', csrf)
      .send({ email: '  Tove.Marrick@Example.test ', role: 'operator' })
      .expect(201);
    expect(created.body).toMatchObject({
      email: 'tove.marrick@example.test',
      role: 'operator',
      state: 'pending',
      invitedBy: { id: admin.id, name: admin.name },
      acceptedAt: null,
      revokedAt: null,
    });
    const hours = (Date.parse(created.body.expiresAt) - Date.parse(created.body.createdAt)) / 3600_000;
    expect(hours).toBeCloseTo(72, 3);
    const row = await Invitation.findByPk(created.body.id);
    expect(row!.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(await MailOutbox.count({ where: { to: 'tove.marrick@example.test', state: 'pending' } })).toBe(1);
    const createEvent = { action: 'invitation.create', targetId: String(created.body.id) };
    expect(await AuditEvent.count({ where: createEvent })).toBe(1);

    await mail.deliver();
    const [message] = await messagesTo('tove.marrick@example.test');
    expect(message!.subject).toBe(`${admin.name} invited you to Kinefold`);
    expect(message!.html).toContain('/invite/');
    const token = tokenFromLink(message!, server.config.publicUrl, '/invite/');
    expect(row!.tokenHash).not.toContain(token);

    const preview = await request(server.app).get(`/api/invitations/${token}`).expect(200);
    expect(preview.body).toEqual({
      email: 'tove.marrick@example.test',
      role: 'operator',
      expiresAt: created.body.expiresAt,
    });

    const weak = await accept(token, { name: 'Tove Marrick', password: 'short' });
    expect(weak.response.status).toBe(400);
    expect(weak.response.body.error).toMatchObject({ code: 'weak_password', details: { field: 'password' } });
    expect(weak.response.body.error.message).toMatch(/at least 12 characters/);
    expect(await User.findByEmail('tove.marrick@example.test')).toBeNull();
    expect((await row!.reload()).acceptedAt).toBeNull();

    const sameAsEmail = await accept(token, { name: 'Tove', password: 'tove.marrick@example.test' });
    expect(sameAsEmail.response.body.error.message).toMatch(/e-mail address/);

    const { agent: newcomer, response } = await accept(token, {
      name: '  Tove Marrick ',
      password: 'rows-of-barley-at-dawn',
    });
    expect(response.status).toBe(201);
    expect(response.body).toMatchObject({ email: 'tove.marrick@example.test', name: 'Tove Marrick', role: 'operator' });
    expect(response.body.passwordHash).toBeUndefined();
    const me = await newcomer.get('/api/me').expect(200);
    expect(me.body.email).toBe('tove.marrick@example.test');
    const user = await User.findByEmail('tove.marrick@example.test');
    expect(user).toMatchObject({ role: 'operator', disabled: false });
    expect(user!.lastSignInAt).toBeInstanceOf(Date);
    expect((await row!.reload()).acceptedAt).toBeInstanceOf(Date);
    expect(await AuditEvent.count({ where: { action: 'invitation.accept', actorId: user!.id } })).toBe(1);
    expect(await AuditEvent.count({ where: { action: 'user.create', targetId: String(user!.id) } })).toBe(1);
    await signedInAgent(server, 'tove.marrick@example.test', 'rows-of-barley-at-dawn');

    const again = await accept(token, { name: 'Someone Else', password: 'another-long-passphrase' });
    expect(again.response.status).toBe(410);
    expect(again.response.body.error).toMatchObject({ code: 'invitation_used' });
    expect(again.response.body.error.message).toMatch(/already been used/);
    await request(server.app).get(`/api/invitations/${token}`).expect(410);
    expect(await User.count({ where: { email: 'tove.marrick@example.test' } })).toBe(1);
  });

  it('answers 410 for an expired link', async () => {
    const { invitation, token } = await invite('late@example.test');
    await Invitation.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: invitation.id } });
    const { response } = await accept(token, { name: 'Late Comer', password: 'too-late-for-this-one' });
    expect(response.status).toBe(410);
    expect(response.body.error.code).toBe('invitation_expired');
    expect(response.body.error.message).toMatch(/expired on .*Ask an admin to send it again/);
    expect(await User.findByEmail('late@example.test')).toBeNull();
    const { agent } = await adminAgent();
    const listed = await agent.get('/api/invitations?state=expired').expect(200);
    expect(listed.body.items.map((item: { email: string }) => item.email)).toContain('late@example.test');
  });

  it('answers 410 for a revoked link, and a revoked invitation cannot be revoked or re-sent again', async () => {
    const { invitation, token } = await invite('withdrawn@example.test');
    const { agent, csrf } = await adminAgent();
    const revoked = await agent.post(`/api/invitations/${invitation.id}/revoke`).set('x-csrf-token', csrf).expect(200);
    expect(revoked.body.state).toBe('revoked');
    expect((await Invitation.findByPk(invitation.id))!.revokedAt).toBeInstanceOf(Date);
    expect(await AuditEvent.count({ where: { action: 'invitation.revoke', targetId: String(invitation.id) } })).toBe(1);
    const { response } = await accept(token, { name: 'Withdrawn', password: 'a-long-enough-phrase' });
    expect(response.status).toBe(410);
    expect(response.body.error).toMatchObject({ code: 'invitation_revoked' });
    expect(response.body.error.message).toMatch(/withdrawn by an admin/);
    await agent.post(`/api/invitations/${invitation.id}/revoke`).set('x-csrf-token', csrf).expect(409);
    await agent.post(`/api/invitations/${invitation.id}/resend`).set('x-csrf-token', csrf).expect(409);
  });

  it('re-sends with a fresh link and 72 more hours; the old link stops working', async () => {
    const { invitation, token: oldToken } = await invite('resend@example.test', 'engineer');
    await Invitation.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: invitation.id } });
    const { agent, csrf } = await adminAgent();
    const resent = await agent.post(`/api/invitations/${invitation.id}/resend`).set('x-csrf-token', csrf).expect(200);
    expect(resent.body.state).toBe('pending');
    expect(Date.parse(resent.body.expiresAt)).toBeGreaterThan(Date.now() + 71 * 3600_000);
    await mail.deliver();
    const messages = await messagesTo('resend@example.test');
    expect(messages).toHaveLength(2);
    const newToken = tokenFromLink(messages[1]!, server.config.publicUrl, '/invite/');
    expect(newToken).not.toBe(oldToken);
    const old = await accept(oldToken, { name: 'Nuno', password: 'paired-views-all-day' });
    expect(old.response.status).toBe(404);
    expect(old.response.body.error.code).toBe('invitation_not_found');
    const fresh = await accept(newToken, { name: 'Nuno', password: 'paired-views-all-day' });
    expect(fresh.response.status).toBe(201);
    expect(fresh.response.body.role).toBe('engineer');
    expect(await AuditEvent.count({ where: { action: 'invitation.resend', targetId: String(invitation.id) } })).toBe(1);
  });

  it('refuses a second open invitation for one address and an address that already has an account', async () => {
    await invite('twice@example.test');
    const { agent, csrf } = await adminAgent();
    const twice = await agent
      .post('/api/invitations')
      .set('x-csrf-token', csrf)
      .send({ email: 'twice@example.test', role: 'admin' })
      .expect(409);
    expect(twice.body.error).toMatchObject({ code: 'already_invited' });
    const member = await agent
      .post('/api/invitations')
      .set('x-csrf-token', csrf)
      .send({ email: 'curator@example.test', role: 'curator' })
      .expect(409);
    expect(member.body.error.code).toBe('email_taken');
    expect(await Invitation.count({ where: { email: 'twice@example.test' } })).toBe(1);
  });

  it('answers 404 for a link that never existed and 400 for one that is cut short', async () => {
    const unknown = await request(server.app)
      .get(`/api/invitations/${'x'.repeat(43)}`)
      .expect(404);
    expect(unknown.body.error.message).toMatch(/not valid/);
    const short = await request(server.app).get('/api/invitations/abc').expect(400);
    expect(short.body.error.message).toMatch(/^token/);
    const { response } = await accept('x'.repeat(43), { name: 'Nobody', password: 'irrelevant-passphrase' });
    expect(response.status).toBe(404);
  });

  it('answers 400 naming the field for a bad acceptance body, before touching the invitation', async () => {
    const { invitation, token } = await invite('body@example.test');
    for (const [body, field] of [
      [{ password: 'long-enough-passphrase' }, 'name'],
      [{ name: 'B' }, 'password'],
      [{ name: 'B', password: 'long-enough-passphrase', role: 'admin' }, 'role'],
    ] as const) {
      const { response } = await accept(token, body);
      expect(response.status).toBe(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    expect((await Invitation.findByPk(invitation.id))!.acceptedAt).toBeNull();
  });

  it('lists invitations for admins with state filter, search and sorting', async () => {
    const { agent } = await adminAgent();
    const pending = await agent.get('/api/invitations?state=pending&sort=email').expect(200);
    const emails = pending.body.items.map((item: { email: string }) => item.email);
    expect(emails).toEqual([...emails].sort());
    expect(pending.body.items.every((item: { state: string }) => item.state === 'pending')).toBe(true);
    const accepted = await agent.get('/api/invitations?state=accepted').expect(200);
    expect(accepted.body.items.map((item: { email: string }) => item.email)).toContain('tove.marrick@example.test');
    const search = await agent.get('/api/invitations?search=TWICE').expect(200);
    expect(search.body).toMatchObject({ total: 1, page: 1, pageSize: 50 });
    const combined = await agent.get('/api/invitations?search=twice&state=accepted').expect(200);
    expect(combined.body.total).toBe(0);
  });
});
