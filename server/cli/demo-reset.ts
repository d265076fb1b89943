/**
 * `npm run demo:reset`: removes the database (on PostgreSQL: every Kinefold table, by undoing each migration) and
 * every stored file under KINEFOLD_STORAGE_DIR, so the next `npm start` creates the demo campaign afresh. Refuses while a Kinefold server answers on PORT: deleting the
 * database under a running server would leave it writing into files that are gone.
 */
import fs from 'node:fs';
import path from 'node:path';
import { loadConfig } from '../core/config';
import { createMigrator } from '../core/db/migrator';
import { openKinefoldDatabaseOrExit } from '../core/db/open';

const config = loadConfig();
const KINEFOLD_FOLDERS = ['db', 'incoming', 'clips', 'pairsets'];
const HEALTH_TIMEOUT_MS = 2000;

async function kinefoldAnswers(port: number): Promise<boolean> {
  try {
    const response = await fetch(`http://127.0.0.1:${port}/api/health`, {
      signal: AbortSignal.timeout(HEALTH_TIMEOUT_MS),
    });
    return response.ok && ((await response.json()) as { status?: string }).status === 'ok';
  } catch {
    return false;
  }
}

if (await kinefoldAnswers(config.port)) {
  console.error(
    `demo:reset: Kinefold is running on port ${config.port}; stop it (Ctrl-C where npm start runs) ` +
      'and run demo:reset again. Nothing was removed.',
  );
  process.exit(1);
}
if (config.databaseUrl) {
  const sequelize = await openKinefoldDatabaseOrExit(config);
  await createMigrator(sequelize).down({ to: 0 });
  await sequelize.close();
  console.log('demo:reset: removed every Kinefold table from the PostgreSQL database.');
}
for (const folder of KINEFOLD_FOLDERS) {
  fs.rmSync(path.join(config.storageDir, folder), { recursive: true, force: true });
}
console.log(`demo:reset: emptied ${config.storageDir} (${KINEFOLD_FOLDERS.join(', ')}). Run npm start to begin again.`);
