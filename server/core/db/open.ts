import type { Sequelize } from 'sequelize';
import { initModels } from '../models';
import { openDatabase, type DatabaseConfig } from './connection';
import { createMigrator } from './migrator';
import { DatabaseStartupError } from './postgres-connection';

const SCHEMA_WAIT_MS = 500;

/**
 * Opens Kinefold's database and binds the models. The server (`migrate: true`) brings the schema up to date;
 * a worker waits until it is, so two processes never migrate at once.
 */
export async function openKinefoldDatabase(
  config: DatabaseConfig,
  { migrate }: { migrate: boolean } = { migrate: true },
): Promise<Sequelize> {
  const sequelize = await openDatabase(config);
  const migrator = createMigrator(sequelize);
  if (migrate) {
    await migrator.up();
  } else {
    while ((await migrator.pending()).length > 0) await new Promise((done) => setTimeout(done, SCHEMA_WAIT_MS));
  }
  initModels(sequelize);
  return sequelize;
}

/**
 * For a process's entry point: the database opened, or, when it cannot be reached, one line naming the setting
 * and the host on stderr and exit code 1 (a stack trace would only hide the cause).
 */
export async function openKinefoldDatabaseOrExit(
  config: DatabaseConfig,
  options?: { migrate: boolean },
): Promise<Sequelize> {
  try {
    return await openKinefoldDatabase(config, options);
  } catch (error) {
    if (!(error instanceof DatabaseStartupError)) throw error;
    console.error(`Kinefold: ${error.message}`);
    process.exit(1);
  }
}
