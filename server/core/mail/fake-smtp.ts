import type { AddressInfo } from 'node:net';
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from 'smtp-server';
import { MailMessage } from '../models';
import { readMessage } from './mime-reader';

/** Largest message the fake server takes; Kinefold's own messages are a few kilobytes. */
const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;

export interface FakeSmtp {
  host: string;
  port: number;
  close(): Promise<void>;
}

/**
 * A local SMTP server for when no real one is configured: it listens on a loopback port of its own choosing
 * and keeps every message it receives in MailMessage, where admins read it in the mail log and tests read it.
 * Loopback only, so it needs neither TLS nor authentication.
 */
export async function startFakeSmtp(): Promise<FakeSmtp> {
  const host = '127.0.0.1';
  const server = new SMTPServer({
    name: 'kinefold-fake-smtp',
    disabledCommands: ['AUTH', 'STARTTLS'],
    disableReverseLookup: true,
    size: MAX_MESSAGE_BYTES,
    closeTimeout: 2_000,
    logger: false,
    onData: receive,
  });
  const listener = server.listen(0, host);
  await new Promise<void>((resolve, reject) => {
    listener.once('listening', resolve);
    listener.once('error', reject);
  });
  const { port } = listener.address() as AddressInfo;
  return {
    host,
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

function receive(
  stream: SMTPServerDataStream,
  session: SMTPServerSession,
  callback: (error?: Error | null, message?: string) => void,
): void {
  const chunks: Buffer[] = [];
  stream.on('data', (chunk: Buffer) => chunks.push(chunk));
  stream.once('error', callback);
  stream.once('end', () => {
    if (stream.sizeExceeded) {
      callback(Object.assign(new Error('Message is larger than the fake SMTP server keeps.'), { responseCode: 552 }));
      return;
    }
    store(Buffer.concat(chunks), session).then((id) => callback(null, `Kept as message ${id}`), callback);
  });
}

async function store(raw: Buffer, session: SMTPServerSession): Promise<number> {
  const message = readMessage(raw);
  const { mailFrom, rcptTo } = session.envelope;
  const row = await MailMessage.create({
    messageId: message.messageId,
    from: mailFrom ? mailFrom.address : '',
    to: rcptTo.map((recipient) => recipient.address).join(', '),
    subject: message.subject,
    text: message.text,
    html: message.html,
  });
  return row.id;
}
