/**
 * `npm run user:add -- --email E --role R --password P [--name N]`: creates a user from the shell.
 * Safe while the server runs (the database is shared through WAL and busy timeouts).
 */
import { parseArgs } from 'node:util';
import { ROLES, type Role } from '../../shared/roles';
import { loadConfig } from '../core/config';
import { openKinefoldDatabaseOrExit } from '../core/db/open';
import { AppError } from '../core/errors';
import { createUser } from '../core/people/users';

const USAGE = 'usage: npm run user:add -- --email E --role operator|curator|engineer|admin --password P [--name N]';

function fail(message: string): never {
  console.error(`user:add: ${message}`);
  process.exit(1);
}

let values: Record<string, string | undefined>;
try {
  ({ values } = parseArgs({
    options: {
      email: { type: 'string' },
      role: { type: 'string' },
      password: { type: 'string' },
      name: { type: 'string' },
    },
  }));
} catch (error) {
  fail(`${(error as Error).message}\n${USAGE}`);
}
const { email, role, password } = values;
if (!email || !role || !password) fail(`--email, --role and --password are required.\n${USAGE}`);
if (!/^[^@\s]+@[^@\s]+$/.test(email)) fail(`"${email}" is not an e-mail address.`);
if (!(ROLES as readonly string[]).includes(role)) fail(`role must be one of ${ROLES.join(', ')} (got "${role}").`);

const config = loadConfig();
const sequelize = await openKinefoldDatabaseOrExit(config);
try {
  const user = await createUser(
    { email, role: role as Role, password, name: values.name ?? email.split('@')[0]! },
    config.bcryptCost,
    null,
  );
  console.log(`user:add: created ${user.role} ${user.email} (id ${user.id}).`);
} catch (error) {
  if (error instanceof AppError) fail(error.message);
  throw error;
} finally {
  await sequelize.close();
}
