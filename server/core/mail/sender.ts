import type { Transporter } from 'nodemailer';
import { QueryTypes, type Sequelize } from 'sequelize';
import { pickForUpdate } from '../db/dialect';
import { MailOutbox } from '../models';

export interface MailSenderOptions {
  transport: Transporter;
  /** The sender address, read again for every message so an admin's change applies at once. */
  from: string | (() => Promise<string>);
  /** How often the outbox is looked at; the worker writes to it too, so it is polled rather than signalled. */
  pollMs?: number;
  /** How long a claimed row stays with one sender; longer than the transport's worst-case timeouts. */
  leaseMs?: number;
  maxAttempts?: number;
  /** Retry n waits retryBaseMs × 2^(n−1), capped at retryMaxMs. */
  retryBaseMs?: number;
  retryMaxMs?: number;
  clock?: () => Date;
  onError?: (error: unknown) => void;
}

export interface MailSender {
  /** Starts polling the outbox. */
  start(): void;
  /** Sends every row that is due now; resolves with how many were sent. */
  drain(): Promise<number>;
  /** Stops polling, lets a message in flight finish, closes the transport. */
  stop(): Promise<void>;
}

interface Claim {
  id: number;
  attempts: number;
}

/**
 * One statement both picks and takes a row, so two senders (two server processes, or a restarted one) never
 * hold the same row: a due `pending` row, or a `sending` row whose sender died and whose lease ran out.
 */
const claimSql = (sequelize: Sequelize) => `
  UPDATE mail_outbox
  SET state = 'sending', attempts = attempts + 1, "leaseExpiresAt" = :leaseUntil, "updatedAt" = :now
  WHERE id = (
    SELECT id FROM mail_outbox
    WHERE (state = 'pending' AND "nextAttemptAt" <= :now) OR (state = 'sending' AND "leaseExpiresAt" <= :now)
    ORDER BY id
    LIMIT 1 ${pickForUpdate(sequelize)}
  )
  RETURNING id, attempts`;

/**
 * Delivers the outbox with nodemailer. A row is marked `sent` only after the SMTP server accepted it.
 * Delivery is at-least-once: should the process die between the server's acceptance and that mark, the
 * lease runs out and the row is sent again, with the same Message-ID so mail programs can fold the copy.
 * We prefer that rare duplicate to a lost invitation or reset link. Writing and sending never race: a row
 * written before a restart simply waits as `pending` and is sent once by the next sender.
 */
export function createMailSender(options: MailSenderOptions): MailSender {
  const pollMs = options.pollMs ?? 2_000;
  const leaseMs = options.leaseMs ?? 5 * 60_000;
  const maxAttempts = options.maxAttempts ?? 8;
  const retryBaseMs = options.retryBaseMs ?? 30_000;
  const retryMaxMs = options.retryMaxMs ?? 60 * 60_000;
  const clock = options.clock ?? (() => new Date());
  const onError = options.onError ?? ((error: unknown) => console.error('Kinefold mail sender:', error));
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<number> | null = null;
  let stopped = false;

  async function claimNext(): Promise<Claim | null> {
    const now = clock();
    const rows = await MailOutbox.sequelize!.query<Claim>(claimSql(MailOutbox.sequelize!), {
      replacements: { now, leaseUntil: new Date(now.getTime() + leaseMs) },
      type: QueryTypes.SELECT,
    });
    return rows[0] ?? null;
  }

  /** Writes the outcome only while the claim is still ours (a sender past its lease lost the row). */
  function settle(claim: Claim, changes: Partial<MailOutbox>): Promise<unknown> {
    return MailOutbox.update(
      { ...changes, leaseExpiresAt: null },
      { where: { id: claim.id, state: 'sending', attempts: claim.attempts } },
    );
  }

  async function deliver(claim: Claim): Promise<boolean> {
    const row = await MailOutbox.findByPk(claim.id);
    if (!row) return false;
    if (claim.attempts > maxAttempts) {
      await settle(claim, { state: 'failed', result: `Gave up after ${maxAttempts} attempts.` });
      return false;
    }
    try {
      const info = (await options.transport.sendMail({
        from: typeof options.from === 'string' ? options.from : await options.from(),
        to: row.to,
        subject: row.subject,
        text: row.text,
        html: row.html,
        messageId: row.messageId,
      })) as { response?: string };
      await settle(claim, { state: 'sent', sentAt: clock(), result: info.response ?? 'accepted' });
      return true;
    } catch (error) {
      // nodemailer marks 5xx answers as permanent: retrying a refused address only repeats the refusal.
      const permanent = (error as { permanent?: boolean }).permanent === true;
      const result = (error as Error).message;
      if (permanent || claim.attempts >= maxAttempts) {
        await settle(claim, { state: 'failed', result });
      } else {
        const waitMs = Math.min(retryBaseMs * 2 ** (claim.attempts - 1), retryMaxMs);
        await settle(claim, { state: 'pending', result, nextAttemptAt: new Date(clock().getTime() + waitMs) });
      }
      onError(new Error(`message ${row.id} to ${row.to} not sent (attempt ${claim.attempts}): ${result}`));
      return false;
    }
  }

  async function drainDue(): Promise<number> {
    let sent = 0;
    while (!stopped) {
      const claim = await claimNext();
      if (!claim) break;
      if (await deliver(claim)) sent += 1;
    }
    return sent;
  }

  function drain(): Promise<number> {
    running ??= drainDue().finally(() => {
      running = null;
    });
    return running;
  }

  function schedule(): void {
    if (stopped) return;
    timer = setTimeout(() => {
      drain().catch(onError).finally(schedule);
    }, pollMs);
  }

  return {
    start() {
      stopped = false;
      drain().catch(onError).finally(schedule);
    },
    drain,
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      await running?.catch(() => undefined);
      options.transport.close();
    },
  };
}
