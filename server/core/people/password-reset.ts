import { Op, type Transaction } from 'sequelize';
import { HttpStatus } from '../../../shared/http-status';
import type { Config } from '../config';
import { AppError } from '../errors';
import { queueMail } from '../mail/outbox';
import { PasswordReset, User } from '../models';
import { recordAudit } from '../audit/audit';
import { hashOneTimeToken, newOneTimeToken } from './one-time-tokens';
import { assertPasswordAcceptable, hashPassword } from './passwords';
import { endSessionsOf } from './sessions';

export const RESET_TTL_MS = 3600_000;

/**
 * Writes a reset link and its mail in the caller's transaction. Only the newest link works: earlier unused
 * ones expire now. `admin` is whoever sent it from the people screen, or null when the person asked.
 */
export async function issueResetLink(
  user: User,
  admin: User | null,
  config: Pick<Config, 'publicUrl'>,
  transaction: Transaction,
): Promise<PasswordReset> {
  const now = new Date();
  await PasswordReset.update(
    { expiresAt: now },
    { where: { userId: user.id, usedAt: null, expiresAt: { [Op.gt]: now } }, transaction },
  );
  const { token, tokenHash } = newOneTimeToken();
  const expiresAt = new Date(now.getTime() + RESET_TTL_MS);
  const reset = await PasswordReset.create(
    { userId: user.id, tokenHash, expiresAt, requestedById: admin?.id ?? null },
    { transaction },
  );
  await queueMail(
    {
      to: user.email,
      template: 'password-reset',
      data: { name: user.name, token, expiresAt, requestedBy: admin ? 'admin' : 'self' },
    },
    { transaction, publicUrl: config.publicUrl },
  );
  await recordAudit(
    {
      actorId: admin?.id ?? null,
      action: 'password.reset_link',
      targetType: 'user',
      targetId: user.id,
      detail: { requestedBy: admin ? 'admin' : 'self' },
    },
    transaction,
  );
  return reset;
}

/**
 * The sign-in page's "forgot password": mails a link when the address belongs to an active account and
 * does nothing otherwise. The route answers before calling this, so neither the answer nor its timing
 * tells whether an account exists.
 */
export async function requestPasswordReset(email: string, config: Pick<Config, 'publicUrl'>): Promise<void> {
  const user = await User.findByEmail(email);
  if (!user || user.disabled) return;
  await User.sequelize!.transaction((transaction) => issueResetLink(user, null, config, transaction));
}

function resetLinkGone(code: string, message: string): AppError {
  return new AppError(HttpStatus.GONE, code, message);
}

/**
 * Sets a new password from a reset link, once: the conditional update takes the link, so a second use
 * fails even when both arrive together. Every other session of the account ends.
 */
export async function resetPassword(
  token: string,
  password: string,
  currentSid: string | null,
  bcryptCost: number,
): Promise<void> {
  const reset = await PasswordReset.findByTokenHash(hashOneTimeToken(token));
  if (!reset) {
    throw new AppError(
      HttpStatus.NOT_FOUND,
      'reset_link_not_found',
      'This reset link is not valid. Check that you opened the whole link, or ask for a new one.',
    );
  }
  const now = new Date();
  if (reset.usedAt) throw resetLinkGone('reset_link_used', 'This reset link was already used; ask for a new one.');
  if (reset.expiresAt <= now) {
    throw resetLinkGone('reset_link_expired', 'This reset link has expired or a newer one was sent; ask again.');
  }
  const user = await User.findByPk(reset.userId);
  if (!user || user.disabled) {
    throw resetLinkGone('account_disabled', 'This account is disabled; ask an admin to enable it.');
  }
  assertPasswordAcceptable(password, user.email);
  const passwordHash = await hashPassword(password, bcryptCost);
  await User.sequelize!.transaction(async (transaction) => {
    const [taken] = await PasswordReset.update(
      { usedAt: now },
      { where: { id: reset.id, usedAt: null, expiresAt: { [Op.gt]: now } }, transaction },
    );
    if (taken === 0) throw resetLinkGone('reset_link_used', 'This reset link was already used; ask for a new one.');
    await User.update({ passwordHash }, { where: { id: user.id }, transaction });
    const ended = await endSessionsOf(user.id, currentSid, transaction);
    await recordAudit(
      {
        actorId: user.id,
        action: 'password.reset',
        targetType: 'user',
        targetId: user.id,
        detail: { sessionsEnded: ended },
      },
      transaction,
    );
  });
}
