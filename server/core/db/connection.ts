import type { Sequelize } from 'sequelize';
import { databasePath, type Config } from '../config';
import { openPostgresDatabase } from './postgres-connection';
import { openSqliteDatabase } from './sqlite-connection';

/** Kinefold's database: PostgreSQL when KINEFOLD_DATABASE_URL is set, else the SQLite file under the storage root. */
export function openDatabase(config: Pick<Config, 'storageDir' | 'databaseUrl'>): Promise<Sequelize> {
  return config.databaseUrl ? openPostgresDatabase(config.databaseUrl) : openSqliteDatabase(databasePath(config));
}
