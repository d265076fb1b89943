import { UniqueConstraintError, type Order, type WhereOptions } from 'sequelize';
import type { ListPage, UserSummary } from '../../../shared/api-types';
import type { Role } from '../../../shared/roles';
import type { UserListQuery } from '../../../shared/schemas/users';
import { conflict } from '../errors';
import { User } from '../models';
import { recordAudit } from '../audit/audit';
import { containsText } from '../db/text-search';
import { assertPasswordAcceptable, hashPassword } from './passwords';

export interface NewUser {
  email: string;
  name: string;
  role: Role;
  password: string;
}

/** Creates a user after checking the password rule; a taken e-mail address is a 409. */
export async function createUser(input: NewUser, bcryptCost: number, actorId: number | null): Promise<User> {
  const email = input.email.trim().toLowerCase();
  assertPasswordAcceptable(input.password, email);
  if (await User.findByEmail(email)) throw duplicateEmail(email);
  const passwordHash = await hashPassword(input.password, bcryptCost);
  try {
    return await User.sequelize!.transaction(async (transaction) => {
      const user = await User.create(
        { email, name: input.name.trim(), role: input.role, passwordHash },
        { transaction },
      );
      await recordAudit(
        { actorId, action: 'user.create', targetType: 'user', targetId: user.id, detail: { email, role: input.role } },
        transaction,
      );
      return user;
    });
  } catch (error) {
    // Another request may have taken the address between the check and the insert.
    if (error instanceof UniqueConstraintError) throw duplicateEmail(email);
    throw error;
  }
}

function duplicateEmail(email: string) {
  return conflict('email_taken', `A user with the e-mail address ${email} already exists.`, { field: 'email' });
}

export async function listUsers(query: UserListQuery): Promise<ListPage<UserSummary>> {
  const where: WhereOptions<User> = {
    ...(query.search ? containsText<User>(User.sequelize!, ['email', 'name'], query.search) : {}),
    ...(query.role ? { role: query.role } : {}),
  };
  const order: Order = query.sort
    ? [
        [query.sort.replace(/^-/, ''), query.sort.startsWith('-') ? 'DESC' : 'ASC'],
        ['id', 'ASC'],
      ]
    : [['id', 'ASC']];
  const { rows, count } = await User.findAndCountAll({
    where,
    order,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map((user) => user.toApi()), total: count, page: query.page, pageSize: query.pageSize };
}

/** Notes when a person last signed in, for the people screen. */
export async function recordSignIn(user: User): Promise<void> {
  user.lastSignInAt = new Date();
  await user.save({ fields: ['lastSignInAt'] });
}
