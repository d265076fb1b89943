import type { StorageUse } from '../../../shared/api-types';
import type { ChangePasswordBody, UpdateProfileBody } from '../../../shared/schemas/profile';
import { badRequest } from '../errors';
import type { User } from '../models';
import { recordAudit } from '../audit/audit';
import { assertPasswordAcceptable, hashPassword, verifyPassword } from './passwords';
import { userUsage } from '../usage/quotas';
import { endSessionsOf } from './sessions';

/** What the person's clips hold on disk against their own quota; uploads still in flight are not counted yet. */
export async function storageUse(user: User): Promise<StorageUse> {
  const { stored } = await userUsage(user.id);
  return { usedBytes: stored, quotaBytes: user.quotaBytes === null ? null : Number(user.quotaBytes) };
}

/** A person renames themselves; the audit trail keeps the old name. */
export async function updateProfile(user: User, input: UpdateProfileBody): Promise<User> {
  if (input.name === user.name) return user;
  const from = user.name;
  await user.sequelize.transaction(async (transaction) => {
    user.name = input.name;
    await user.save({ fields: ['name'], transaction });
    await recordAudit(
      {
        actorId: user.id,
        action: 'user.update',
        targetType: 'user',
        targetId: user.id,
        detail: { changes: { name: { from, to: input.name } } },
      },
      transaction,
    );
  });
  return user;
}

/** Changes the password after checking the current one; the person's other sessions end, this one stays. */
export async function changePassword(
  user: User,
  input: ChangePasswordBody,
  currentSid: string,
  bcryptCost: number,
): Promise<void> {
  if (!(await verifyPassword(input.currentPassword, user.passwordHash))) {
    throw badRequest('wrong_password', 'The current password is wrong.', { field: 'currentPassword' });
  }
  assertPasswordAcceptable(input.password, user.email);
  if (input.password === input.currentPassword) {
    throw badRequest('same_password', 'The new password is the same as the current one.', { field: 'password' });
  }
  const passwordHash = await hashPassword(input.password, bcryptCost);
  await user.sequelize.transaction(async (transaction) => {
    user.passwordHash = passwordHash;
    await user.save({ fields: ['passwordHash'], transaction });
    const ended = await endSessionsOf(user.id, currentSid, transaction);
    await recordAudit(
      {
        actorId: user.id,
        action: 'password.change',
        targetType: 'user',
        targetId: user.id,
        detail: { sessionsEnded: ended },
      },
      transaction,
    );
  });
}
