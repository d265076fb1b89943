import { startMail, type RunningMail } from '../../server/core/mail';
import { MailMessage } from '../../server/core/models';
import type { TestServer } from './test-server';

/** The local fake SMTP server and an idle sender for a test server; `deliver()` sends what is due now. */
export async function startTestMail(server: TestServer): Promise<RunningMail & { deliver(): Promise<number> }> {
  const mail = await startMail({ ...server.config, smtpUrl: null }, { start: false });
  return { ...mail, deliver: () => mail.sender.drain() };
}

/** What the fake SMTP server received for one address, oldest first. */
export function messagesTo(email: string): Promise<MailMessage[]> {
  return MailMessage.findAll({ where: { to: email }, order: [['id', 'ASC']] });
}

/** The one-time code of the link to `path` (e.g. `/invite/`) in a message's plain text. */
export function tokenFromLink(message: MailMessage, publicUrl: string, path: string): string {
  const prefix = `${publicUrl}${path}`.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
  const match = message.text.match(new RegExp(`${prefix}([A-Za-z0-9_-]{43})`));
  if (!match) throw new Error(`no ${path} link in message ${message.id}:\n${message.text}`);
  return match[1]!;
}
