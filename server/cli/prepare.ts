/** `npm start`'s first step: bring the schema up to date and create demo data, before server and worker start. */
import { loadConfig } from '../core/config';
import { openKinefoldDatabaseOrExit } from '../core/db/open';
import { DEMO_ACCOUNTS, createDemoAccountsOnFirstStart } from '../core/people/demo-accounts';

const config = loadConfig();
const sequelize = await openKinefoldDatabaseOrExit(config);
if (config.demo !== 'off' && (await createDemoAccountsOnFirstStart(config.bcryptCost))) {
  console.log('Kinefold: created the demo accounts (KINEFOLD_DEMO=%s):', config.demo);
  for (const account of DEMO_ACCOUNTS) console.log(`  ${account.role.padEnd(9)} ${account.email}  ${account.password}`);
}
await sequelize.close();
