import nodemailer from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { startFakeSmtp, type FakeSmtp } from '../../server/core/mail/fake-smtp';
import { queueMail } from '../../server/core/mail/outbox';
import { createMailSender, type MailSender } from '../../server/core/mail/sender';
import { MailMessage, MailOutbox } from '../../server/core/models';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let fakeSmtp: FakeSmtp;
const senders: MailSender[] = [];

beforeAll(async () => {
  server = await startTestServer();
  for (const role of ['operator', 'curator', 'engineer', 'admin'] as const) await addUser(server, role);
  fakeSmtp = await startFakeSmtp();
});
afterAll(async () => {
  await Promise.all(senders.map((sender) => sender.stop()));
  await fakeSmtp.close();
  await server.close();
});
beforeEach(async () => {
  await MailOutbox.destroy({ where: {} });
  await MailMessage.destroy({ where: {} });
});

/** A sender to the fake SMTP server, as a (re)started server process would make one. */
function newSender(options: Partial<Parameters<typeof createMailSender>[0]> = {}): MailSender {
  const transport = nodemailer.createTransport({ host: fakeSmtp.host, port: fakeSmtp.port, ignoreTLS: true });
  const sender = createMailSender({ transport, from: server.config.mailFrom, onError: () => undefined, ...options });
  senders.push(sender);
  return sender;
}

function queueInvitationMail(to: string, inviterName = 'Petra Halvorsen'): Promise<MailOutbox> {
  return server.sequelize.transaction((transaction) =>
    queueMail(
      {
        to,
        template: 'invitation',
        data: { inviterName, role: 'curator', token: 'A'.repeat(43), expiresAt: new Date('2031-05-04T10:00:00Z') },
      },
      { transaction, publicUrl: server.config.publicUrl },
    ),
  );
}

describe('the outbox', () => {
  it('keeps nothing when the transaction that wrote the message rolls back', async () => {
    await expect(
      server.sequelize.transaction(async (transaction) => {
        await queueMail(
          {
            to: 'rolled-back@example.test',
            template: 'password-reset',
            data: { name: 'Nobody', token: 'B'.repeat(43), expiresAt: new Date(), requestedBy: 'self' },
          },
          { transaction, publicUrl: server.config.publicUrl },
        );
        throw new Error('the change failed');
      }),
    ).rejects.toThrow('the change failed');
    expect(await MailOutbox.count()).toBe(0);
    expect(await newSender().drain()).toBe(0);
  });

  it('renders plain text and HTML with links under the public URL, and survives non-ASCII words', async () => {
    await queueInvitationMail('ilse@example.test', 'Åsa Ølstad – café');
    expect(await newSender().drain()).toBe(1);
    const [message] = await MailMessage.findAll();
    expect(message!.to).toBe('ilse@example.test');
    expect(message!.subject).toBe('Åsa Ølstad – café invited you to Kinefold');
    expect(message!.text).toContain(`http://localhost:3000/invite/${'A'.repeat(43)}`);
    expect(message!.text).toContain('as a curator');
    expect(message!.text).toContain('4 May 2031, 10:00 UTC');
    expect(message!.html).toContain(`href="http://localhost:3000/invite/${'A'.repeat(43)}"`);
    expect(message!.html).toContain('Åsa Ølstad – café');
    const row = await MailOutbox.findOne();
    expect(row).toMatchObject({ state: 'sent', attempts: 1, leaseExpiresAt: null });
    expect(row!.sentAt).toBeInstanceOf(Date);
    expect(message!.messageId).toBe(row!.messageId);
  });

  it('escapes what it puts into the HTML body', async () => {
    await queueInvitationMail('escape@example.test', '<script>alert(1)</script>');
    await newSender().drain();
    const message = await MailMessage.findOne();
    expect(message!.html).not.toContain('<script>');
    expect(message!.html).toContain('&lt;script&gt;');
  });
});

describe('the mail sender', () => {
  it('delivers each message once when the server restarts between writing and sending', async () => {
    const rows = await Promise.all(['a', 'b', 'c'].map((name) => queueInvitationMail(`${name}@example.test`)));
    // The process that wrote the rows stopped before sending; a new one starts and drains the outbox.
    const afterRestart = newSender();
    expect(await afterRestart.drain()).toBe(3);
    await afterRestart.stop();
    const secondRestart = newSender();
    expect(await secondRestart.drain()).toBe(0);
    const received = await MailMessage.findAll({ order: [['id', 'ASC']] });
    expect(received.map((message) => message.messageId).sort()).toEqual(rows.map((row) => row.messageId).sort());
    expect(await MailOutbox.count({ where: { state: 'sent', attempts: 1 } })).toBe(3);
  });

  it('never lets two senders send the same row', async () => {
    for (let i = 0; i < 8; i += 1) await queueInvitationMail(`many-${i}@example.test`);
    const counts = await Promise.all([newSender().drain(), newSender().drain(), newSender().drain()]);
    expect(counts.reduce((sum, count) => sum + count, 0)).toBe(8);
    const received = await MailMessage.findAll();
    expect(received).toHaveLength(8);
    expect(new Set(received.map((message) => message.messageId)).size).toBe(8);
  });

  it('leaves a row claimed by a sender that died alone until its lease runs out, then sends it again', async () => {
    const row = await queueInvitationMail('lease@example.test');
    const now = Date.now();
    await row.update({ state: 'sending', attempts: 1, leaseExpiresAt: new Date(now + 60_000) });
    expect(await newSender({ clock: () => new Date(now + 30_000) }).drain()).toBe(0);
    expect(await MailMessage.count()).toBe(0);
    expect(await newSender({ clock: () => new Date(now + 61_000) }).drain()).toBe(1);
    await row.reload();
    expect(row).toMatchObject({ state: 'sent', attempts: 2 });
    expect(await MailMessage.count()).toBe(1);
  });

  it('retries a failed delivery later with a growing wait, then gives up', async () => {
    const closed = await startFakeSmtp();
    await closed.close();
    const unreachable = nodemailer.createTransport({ host: '127.0.0.1', port: closed.port, ignoreTLS: true });
    const row = await queueInvitationMail('retry@example.test');
    const start = Date.now();
    const failing = createMailSender({
      transport: unreachable,
      from: server.config.mailFrom,
      onError: () => undefined,
      retryBaseMs: 10_000,
      maxAttempts: 3,
      clock: () => new Date(start),
    });
    expect(await failing.drain()).toBe(0);
    await row.reload();
    expect(row.state).toBe('pending');
    expect(row.attempts).toBe(1);
    expect(row.result).toMatch(/ECONNREFUSED|connect/i);
    expect(row.nextAttemptAt.getTime()).toBe(start + 10_000);
    // Not due yet: nothing happens.
    expect(await failing.drain()).toBe(0);
    expect((await MailOutbox.findByPk(row.id))!.attempts).toBe(1);

    const second = createMailSender({
      transport: unreachable,
      from: server.config.mailFrom,
      onError: () => undefined,
      retryBaseMs: 10_000,
      maxAttempts: 3,
      clock: () => new Date(start + 10_000),
    });
    await second.drain();
    await row.reload();
    expect(row.attempts).toBe(2);
    expect(row.nextAttemptAt.getTime()).toBe(start + 10_000 + 20_000);

    const third = createMailSender({
      transport: unreachable,
      from: server.config.mailFrom,
      onError: () => undefined,
      retryBaseMs: 10_000,
      maxAttempts: 3,
      clock: () => new Date(start + 30_000),
    });
    await third.drain();
    await row.reload();
    expect(row).toMatchObject({ state: 'failed', attempts: 3 });

    const working = newSender({ clock: () => new Date(start + 3_600_000) });
    expect(await working.drain()).toBe(0);
    expect(await MailMessage.count()).toBe(0);
  });

  it('delivers a message that failed once when the SMTP server is back', async () => {
    const row = await queueInvitationMail('back@example.test');
    const start = Date.now();
    await row.update({ attempts: 1, nextAttemptAt: new Date(start + 30_000), result: 'connection refused' });
    expect(await newSender({ clock: () => new Date(start) }).drain()).toBe(0);
    expect(await newSender({ clock: () => new Date(start + 30_000) }).drain()).toBe(1);
    await row.reload();
    expect(row).toMatchObject({ state: 'sent', attempts: 2 });
    expect(row.result).toMatch(/^250/);
  });

  it('gives up at once on a permanent refusal', async () => {
    const refusing = new SMTPServer({
      disabledCommands: ['AUTH', 'STARTTLS'],
      logger: false,
      onRcptTo: (_address, _session, callback) =>
        callback(Object.assign(new Error('No such mailbox here'), { responseCode: 550 })),
    });
    const listener = refusing.listen(0, '127.0.0.1');
    await new Promise((resolve) => listener.once('listening', resolve));
    try {
      const { port } = listener.address() as AddressInfo;
      const row = await queueInvitationMail('nobody@example.test');
      const sender = createMailSender({
        transport: nodemailer.createTransport({ host: '127.0.0.1', port, ignoreTLS: true }),
        from: server.config.mailFrom,
        onError: () => undefined,
      });
      await sender.drain();
      await row.reload();
      expect(row).toMatchObject({ state: 'failed', attempts: 1 });
      expect(row.result).toMatch(/No such mailbox/);
    } finally {
      await new Promise<void>((resolve) => refusing.close(() => resolve()));
    }
  });

  it('polls the outbox once started and finishes what it is sending when stopped', async () => {
    const sender = newSender({ pollMs: 50 });
    sender.start();
    await queueInvitationMail('polled@example.test');
    await expect.poll(() => MailMessage.count({ where: { to: 'polled@example.test' } }), { timeout: 5_000 }).toBe(1);
    await sender.stop();
    await queueInvitationMail('after-stop@example.test');
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(await MailMessage.count({ where: { to: 'after-stop@example.test' } })).toBe(0);
  });
});

describe('GET /api/mail', () => {
  it('is 401 signed out', async () => {
    const response = await request(server.app).get('/api/mail').expect(401);
    expect(response.body.error.code).toBe('sign_in_required');
  });

  it('is 403 for every role but admin', async () => {
    for (const role of ['operator', 'curator', 'engineer']) {
      const { agent } = await signedInAgent(server, `${role}@example.test`);
      expect((await agent.get('/api/mail').expect(403)).body.error.code).toBe('forbidden');
    }
  });

  it('answers 400 naming the field for bad paging, sorting or unknown filters', async () => {
    const { agent } = await signedInAgent(server, 'admin@example.test');
    for (const [query, field] of [
      ['pageSize=500', 'pageSize'],
      ['sort=html', 'sort'],
      ['state=sent', 'state'],
    ]) {
      const response = await agent.get(`/api/mail?${query}`).expect(400);
      expect(response.body.error.message).toMatch(new RegExp(`^${field}`));
    }
  });

  it('lists received messages newest first, with their bodies, searchable by recipient or subject', async () => {
    await queueInvitationMail('first@example.test');
    await newSender().drain();
    await queueInvitationMail('second@example.test', 'Nuno Aldebrand');
    await newSender().drain();
    const { agent } = await signedInAgent(server, 'admin@example.test');
    const all = await agent.get('/api/mail').expect(200);
    expect(all.body).toMatchObject({ total: 2, page: 1, pageSize: 50 });
    const recipients = all.body.items.map((item: { to: string }) => item.to);
    expect(recipients).toEqual(['second@example.test', 'first@example.test']);
    expect(Object.keys(all.body.items[0]).sort()).toEqual(['at', 'html', 'id', 'subject', 'text', 'to']);
    expect(all.body.items[0].text).toContain('/invite/');
    expect(all.body.items[0].html).toContain('<a href=');
    const oldestFirst = await agent.get('/api/mail?sort=at').expect(200);
    expect(oldestFirst.body.items[0].to).toBe('first@example.test');
    const search = await agent.get('/api/mail?search=NUNO').expect(200);
    expect(search.body.items.map((item: { to: string }) => item.to)).toEqual(['second@example.test']);
    await queueInvitationMail('under_score@example.test');
    await newSender().drain();
    const literal = await agent.get('/api/mail?search=under_s').expect(200);
    expect(literal.body.items.map((item: { to: string }) => item.to)).toEqual(['under_score@example.test']);
    expect((await agent.get('/api/mail?search=sec%25nd').expect(200)).body.total).toBe(0);
  });
});
