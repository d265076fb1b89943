import nodemailer from 'nodemailer';
import type { Config } from '../config';
import { currentSettings } from '../settings/settings';
import { startFakeSmtp, type FakeSmtp } from './fake-smtp';
import { createMailSender, type MailSender, type MailSenderOptions } from './sender';

export interface RunningMail {
  /** The local fake SMTP server, when SMTP_URL is unset. */
  fakeSmtp: FakeSmtp | null;
  sender: MailSender;
  stop(): Promise<void>;
}

/** Timeouts well inside the sender's lease, so a hung SMTP server never outlives a claim. */
const SMTP_TIMEOUTS = { connectionTimeout: 30_000, greetingTimeout: 30_000, socketTimeout: 60_000 };

/**
 * Starts the mail side of the server: the configured SMTP server or, with none, a local fake one; then the
 * sender that delivers the outbox to it. `start: false` leaves the sender idle (tests call `drain`).
 */
export async function startMail(
  config: Pick<Config, 'smtpUrl' | 'mailFrom' | 'sessionMaxAgeMs'>,
  { start = true, ...senderOptions }: { start?: boolean } & Partial<MailSenderOptions> = {},
): Promise<RunningMail> {
  const fakeSmtp = config.smtpUrl ? null : await startFakeSmtp();
  const transport = fakeSmtp
    ? nodemailer.createTransport({ host: fakeSmtp.host, port: fakeSmtp.port, secure: false, ignoreTLS: true })
    : nodemailer.createTransport({ url: config.smtpUrl!, ...SMTP_TIMEOUTS });
  const from = async () => (await currentSettings(config)).mailFrom;
  const sender = createMailSender({ transport, from, ...senderOptions });
  if (start) sender.start();
  return {
    fakeSmtp,
    sender,
    async stop() {
      await sender.stop();
      await fakeSmtp?.close();
    },
  };
}
