import type { ResetLinkSent, UserSummary } from '../../../shared/api-types';
import type { UpdateUserBody } from '../../../shared/schemas/people';
import type { Config } from '../config';
import { conflict, notFound } from '../errors';
import { User } from '../models';
import { recordAudit } from '../audit/audit';
import { issueResetLink } from './password-reset';
import { endSessionsOf } from './sessions';

type Change = { from: unknown; to: unknown };

/** The fields whose value really changes, as `{ from, to }`, compared in their API form (quotas as numbers). */
function changesOf(user: User, input: UpdateUserBody): Record<string, Change> {
  const current = user.toApi() as unknown as Record<string, unknown>;
  const changes: Record<string, Change> = {};
  for (const [field, to] of Object.entries(input)) {
    if (to === undefined || current[field] === to) continue;
    changes[field] = { from: current[field], to };
  }
  return changes;
}

/**
 * An admin changes someone's role, state, name or quota. The last active admin can be neither demoted nor
 * disabled; the check runs inside the write transaction (SQLite holds the write lock), so two admins
 * demoting each other at once cannot both succeed. Disabling ends the person's sessions.
 */
export async function updateUser(id: number, input: UpdateUserBody, admin: User): Promise<UserSummary> {
  return User.sequelize!.transaction(async (transaction) => {
    const user = await User.findByPk(id, { transaction });
    if (!user) throw notFound('User');
    const changes = changesOf(user, input);
    if (Object.keys(changes).length === 0) return user.toApi();
    const losesAdmin = user.role === 'admin' && !user.disabled && (changes.role || input.disabled === true);
    if (losesAdmin && (await User.count({ where: { role: 'admin', disabled: false }, transaction })) <= 1) {
      throw conflict(
        'last_admin',
        `${user.name} is the last active admin; make someone else an admin first, so Kinefold keeps one.`,
      );
    }
    await user.update(Object.fromEntries(Object.entries(changes).map(([field, change]) => [field, change.to])), {
      transaction,
    });
    if (changes.disabled && input.disabled) await endSessionsOf(user.id, null, transaction);
    await recordAudit(
      { actorId: admin.id, action: 'user.update', targetType: 'user', targetId: user.id, detail: { changes } },
      transaction,
    );
    return user.toApi();
  });
}

/** An admin mails someone a link to choose a new password (their current one keeps working until then). */
export async function sendResetLink(
  id: number,
  admin: User,
  config: Pick<Config, 'publicUrl'>,
): Promise<ResetLinkSent> {
  const user = await User.findByPk(id);
  if (!user) throw notFound('User');
  if (user.disabled) {
    throw conflict('account_disabled', `${user.name}'s account is disabled; enable it before sending a reset link.`);
  }
  const reset = await User.sequelize!.transaction((transaction) => issueResetLink(user, admin, config, transaction));
  return { email: user.email, expiresAt: reset.expiresAt.toISOString() };
}
