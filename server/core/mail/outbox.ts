import { randomUUID } from 'node:crypto';
import type { Transaction } from 'sequelize';
import { MailOutbox } from '../models';
import { renderTemplate, type MailTemplate, type MailTemplateData } from './templates';

export interface MailRequest<T extends MailTemplate> {
  to: string;
  template: T;
  data: MailTemplateData[T];
}

export interface QueueMailOptions {
  /** The transaction of the change that causes the message; required so the two commit or roll back together. */
  transaction: Transaction;
  /** Base of every link in the message (`config.publicUrl`). */
  publicUrl: string;
}

/**
 * Renders a message from its template and writes it to the outbox. Server and worker both call this; the
 * server's mail sender delivers it once the caller's transaction commits, and never if it rolls back.
 */
export async function queueMail<T extends MailTemplate>(
  mail: MailRequest<T>,
  { transaction, publicUrl }: QueueMailOptions,
): Promise<MailOutbox> {
  const { subject, text, html } = renderTemplate(mail.template, mail.data, publicUrl);
  return MailOutbox.create(
    {
      messageId: `<${randomUUID()}@${new URL(publicUrl).hostname}>`,
      template: mail.template,
      to: mail.to,
      subject,
      text,
      html,
      nextAttemptAt: new Date(),
    },
    { transaction },
  );
}
