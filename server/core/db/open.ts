import type { Sequelize } from 'sequelize';
import { databasePath, type Config } from '../config';
import { initModels } from '../models';
import { openDatabase } from './connection';
import { createMigrator } from './migrator';

const SCHEMA_WAIT_MS = 500;

/**
 * Opens Kinefold's database and binds the models. The server (`migrate: true`) brings the schema up to date;
 * a worker waits until it is, so two processes never migrate at once.
 */
export async function openKinefoldDatabase(
  config: Pick<Config, 'storageDir'>,
  { migrate }: { migrate: boolean } = { migrate: true },
): Promise<Sequelize> {
  const sequelize = await openDatabase(databasePath(config));
  const migrator = createMigrator(sequelize);
  if (migrate) {
    await migrator.up();
  } else {
    while ((await migrator.pending()).length > 0) await new Promise((done) => setTimeout(done, SCHEMA_WAIT_MS));
  }
  initModels(sequelize);
  return sequelize;
}
