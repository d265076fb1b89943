import type { Sequelize } from 'sequelize';
import { databasePath, type Config } from '../config';
import { openPostgresDatabase } from './postgres-connection';
import { openSqliteDatabase } from './sqlite-connection';

/** What opening the database needs from the configuration; KINEFOLD_DATABASE_CA may be left out (none). */
export type DatabaseConfig = Pick<Config, 'storageDir' | 'databaseUrl'> & Partial<Pick<Config, 'databaseCa'>>;

/** Kinefold's database: PostgreSQL when KINEFOLD_DATABASE_URL is set, else the SQLite file under the storage root. */
export function openDatabase(config: DatabaseConfig): Promise<Sequelize> {
  return config.databaseUrl
    ? openPostgresDatabase(config.databaseUrl, config.databaseCa ?? null)
    : openSqliteDatabase(databasePath(config));
}
