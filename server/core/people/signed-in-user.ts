import type { InferAttributes, Sequelize } from 'sequelize';
import { reusedReads, type ReusedReads } from '../db/reused-reads';
import { User } from '../models';

/**
 * How long the account read for a signed-in request answers that person's later requests from memory. A role
 * change, a password change or disabling the account made by this process ends the reuse at once (every write of
 * this process does, reused-reads.ts); one made by another process takes effect here at most this long after.
 */
export const ACCOUNT_REUSE_MS = 5_000;
const REMEMBERED_ACCOUNTS = 10_000;

type Account = InferAttributes<User>;

/** One set per database, so two databases open in one process (tests) never answer for each other. */
const accountsByDatabase = new WeakMap<Sequelize, ReusedReads<Account | null>>();

function accountsOf(sequelize: Sequelize): ReusedReads<Account | null> {
  let accounts = accountsByDatabase.get(sequelize);
  if (!accounts) {
    accounts = reusedReads<Account | null>(ACCOUNT_REUSE_MS, REMEMBERED_ACCOUNTS);
    accountsByDatabase.set(sequelize, accounts);
  }
  return accounts;
}

/**
 * The enabled account with this id, or null when it is gone or disabled. Each caller gets an instance of its own
 * (services change and save the signed-in user's instance), built from one shared read.
 */
export async function signedInUser(id: number): Promise<User | null> {
  const account = await accountsOf(User.sequelize!).read(String(id), async () => {
    const user = await User.findByPk(id);
    return user ? (user.get({ plain: true }) as Account) : null;
  });
  if (!account || account.disabled) return null;
  return User.build({ ...account }, { isNewRecord: false, raw: true });
}
