import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/core/db/connection';
import { createMigrator } from '../../server/core/db/migrator';
import { freshTestDatabase, type TestDatabase } from '../helpers/test-database';

/** Runs in both legs of the matrix: SQLite (project `node`) and PostgreSQL (project `pg`). */
const storageDir = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-migrations-'));
let database: TestDatabase;
let sequelize: Sequelize;

beforeAll(async () => {
  database = await freshTestDatabase();
  sequelize = await openDatabase({ storageDir, databaseUrl: database.url });
});
afterAll(async () => {
  await sequelize.close();
  await database.drop();
  fs.rmSync(storageDir, { recursive: true, force: true });
});

const tables = async () =>
  (await sequelize.getQueryInterface().showAllTables()).filter((name) => name !== 'schema_migrations').sort();

describe('the migrations', () => {
  it('build the schema, undo every step down to nothing, and build it again the same', async () => {
    const migrator = createMigrator(sequelize);
    await migrator.up();
    const built = await tables();
    expect(built).toContain('worker_presences');
    expect(built).toContain('clips');
    await migrator.down({ to: 0 });
    expect(await tables()).toEqual([]);
    await migrator.up();
    expect(await tables()).toEqual(built);
  });

  it('keep flagMask and flagCount equal to the flags on insert and on change (triggers of 0006)', async () => {
    await sequelize.query(
      `INSERT INTO users (email, name, role, "passwordHash", disabled, "createdAt", "updatedAt")
      VALUES ('m@example.test', 'M', 'admin', 'x', FALSE, :now, :now)`,
      { replacements: { now: new Date() } },
    );
    await sequelize.query(
      `INSERT INTO projects (name, description, archived, estimator, "estimatorParams", "sampleFps", "workingSize",
         deltas, "flagThresholds", "createdAt", "updatedAt")
       VALUES ('p', '', FALSE, 'farneback', '{}', 5, 320, '[1]', '{}', :now, :now)`,
      { replacements: { now: new Date() } },
    );
    await sequelize.query(
      `INSERT INTO clips ("projectId", "uploaderId", "originalName", "sizeBytes", "storedBytes", sha256, "sourceExt",
         state, container, codec, "durationS", fps, width, height, tags, flags, "createdAt", "updatedAt")
       VALUES (1, 1, 'a.mp4', 1, 1, 'ab', 'mp4', 'queued', 'mov', 'h264', 1, 25, 16, 16, '[]',
         '["dark","blurry"]', :now, :now)`,
      { replacements: { now: new Date() } },
    );
    const read = async () =>
      (await sequelize.query('SELECT "flagMask", "flagCount" FROM clips', { plain: true })) as {
        flagMask: number;
        flagCount: number;
      };
    // Bits frozen in 0006: dark = bit 0, blurry = bit 2, duplicate = bit 7.
    expect(await read()).toEqual({ flagMask: 0b101, flagCount: 2 });
    await sequelize.query(`UPDATE clips SET flags = '["duplicate"]'`);
    expect(await read()).toEqual({ flagMask: 0b10000000, flagCount: 1 });
  });
});
