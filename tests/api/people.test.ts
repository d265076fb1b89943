import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Session, User } from '../../server/core/models';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let admin: User;
let operator: User;

beforeAll(async () => {
  server = await startTestServer();
  operator = await addUser(server, 'operator');
  await addUser(server, 'curator');
  await addUser(server, 'engineer');
  admin = await addUser(server, 'admin');
});
afterAll(() => server.close());

async function patchAs(email: string, id: number, body: object) {
  const { agent, csrf } = await signedInAgent(server, email);
  return agent.patch(`/api/users/${id}`).set('x-csrf-token', csrf).send(body);
}

describe('PATCH /api/users/:id', () => {
  it('is 401 signed out', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    await agent.patch(`/api/users/${operator.id}`).set('x-csrf-token', csrf).send({ role: 'admin' }).expect(401);
  });

  it('is 403 for every role but admin, and changes nothing', async () => {
    for (const role of ['operator', 'curator', 'engineer']) {
      const response = await patchAs(`${role}@example.test`, operator.id, { role: 'admin' });
      expect(response.status).toBe(403);
    }
    expect((await operator.reload()).role).toBe('operator');
  });

  it('answers 400 naming the field for bad input', async () => {
    const cases: [body: object, field: string][] = [
      [{ role: 'boss' }, 'role'],
      [{ disabled: 'yes' }, 'disabled'],
      [{ name: '   ' }, 'name'],
      [{ quotaBytes: -1 }, 'quotaBytes'],
      [{ quotaBytes: 1.5 }, 'quotaBytes'],
      [{ quotaBytes: '10' }, 'quotaBytes'],
      [{ email: 'new@example.test' }, 'email'],
      [{}, 'body'],
    ];
    for (const [body, field] of cases) {
      const response = await patchAs('admin@example.test', operator.id, body);
      expect(response.status, JSON.stringify(body)).toBe(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
    const { agent, csrf } = await signedInAgent(server, 'admin@example.test');
    const badId = await agent.patch('/api/users/0').set('x-csrf-token', csrf).send({ role: 'curator' }).expect(400);
    expect(badId.body.error.message).toMatch(/^id/);
    await agent.patch('/api/users/9999').set('x-csrf-token', csrf).send({ role: 'curator' }).expect(404);
  });

  it('changes role, name and quota, and records each change with before and after', async () => {
    const response = await patchAs('admin@example.test', operator.id, {
      role: 'curator',
      name: 'Tove M. Marrick',
      quotaBytes: 50 * 1024 ** 3,
    });
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ role: 'curator', name: 'Tove M. Marrick', quotaBytes: 53687091200 });
    await operator.reload();
    expect(operator.role).toBe('curator');
    expect(Number(operator.quotaBytes)).toBe(53687091200);
    const event = await AuditEvent.findOne({
      where: { action: 'user.update', targetId: String(operator.id) },
      order: [['id', 'DESC']],
    });
    expect(event!.actorId).toBe(admin.id);
    expect(event!.detail).toEqual({
      changes: {
        role: { from: 'operator', to: 'curator' },
        name: { from: 'Test operator', to: 'Tove M. Marrick' },
        quotaBytes: { from: null, to: 53687091200 },
      },
    });

    const unlimited = await patchAs('admin@example.test', operator.id, { quotaBytes: null, role: 'curator' });
    expect(unlimited.body.quotaBytes).toBeNull();
    const last = await AuditEvent.findOne({ where: { action: 'user.update' }, order: [['id', 'DESC']] });
    expect(last!.detail).toEqual({ changes: { quotaBytes: { from: 53687091200, to: null } } });
  });

  it('writes no audit event when nothing changes', async () => {
    const before = await AuditEvent.count({ where: { action: 'user.update' } });
    const response = await patchAs('admin@example.test', operator.id, { role: 'curator' });
    expect(response.status).toBe(200);
    expect(await AuditEvent.count({ where: { action: 'user.update' } })).toBe(before);
  });

  it('disables a person, ending their sessions at once, and enables them again', async () => {
    const theirs = await signedInAgent(server, 'engineer@example.test');
    const engineer = (await User.findByEmail('engineer@example.test'))!;
    expect(await Session.count({ where: { userId: engineer.id } })).toBeGreaterThan(0);
    const disabled = await patchAs('admin@example.test', engineer.id, { disabled: true });
    expect(disabled.body.disabled).toBe(true);
    expect(await Session.count({ where: { userId: engineer.id } })).toBe(0);
    await theirs.agent.get('/api/me').expect(401);
    const enabled = await patchAs('admin@example.test', engineer.id, { disabled: false });
    expect(enabled.body.disabled).toBe(false);
    await signedInAgent(server, 'engineer@example.test');
    const events = await AuditEvent.findAll({ where: { action: 'user.update', targetId: String(engineer.id) } });
    expect(events.map((event) => event.detail)).toEqual([
      { changes: { disabled: { from: false, to: true } } },
      { changes: { disabled: { from: true, to: false } } },
    ]);
  });
});

describe('the last active admin', () => {
  it('can be neither demoted nor disabled (409 with a message)', async () => {
    const demote = await patchAs('admin@example.test', admin.id, { role: 'engineer' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_admin');
    expect(demote.body.error.message).toMatch(/last active admin/);
    const disable = await patchAs('admin@example.test', admin.id, { disabled: true });
    expect(disable.status).toBe(409);
    await admin.reload();
    expect(admin).toMatchObject({ role: 'admin', disabled: false });
  });

  it('does not count a disabled admin, and lets go once another admin is active', async () => {
    const second = await addUser(server, 'admin', 'second-admin@example.test');
    expect((await patchAs('admin@example.test', second.id, { disabled: true })).status).toBe(200);
    expect((await patchAs('admin@example.test', admin.id, { role: 'curator' })).status).toBe(409);
    expect((await patchAs('admin@example.test', second.id, { disabled: false })).status).toBe(200);
    const demoted = await patchAs('second-admin@example.test', admin.id, { role: 'curator' });
    expect(demoted.status).toBe(200);
    expect(demoted.body.role).toBe('curator');
    const selfDemote = await patchAs('second-admin@example.test', second.id, { role: 'operator' });
    expect(selfDemote.status).toBe(409);
  });
});
