import type { QueryInterface, Sequelize, Transaction } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import * as foundation from './migrations/0001-foundation';
import * as peopleMail from './migrations/0002-people-mail';
import * as ingest from './migrations/0003-ingest';
import * as pipeline from './migrations/0004-pipeline';
import * as motion from './migrations/0005-motion';
import * as review from './migrations/0006-review';
import * as pairsets from './migrations/0007-pairsets';
import * as admin from './migrations/0008-admin';
import * as clipListOrder from './migrations/0009-clip-list-order';
import * as motionScale from './migrations/0010-motion-scale';
import * as cutMarks from './migrations/0011-cut-marks';
import * as storageDiet from './migrations/0012-storage-diet';
import * as diversity from './migrations/0013-diversity';
import * as jobTiming from './migrations/0014-job-timing';
import * as workerPresences from './migrations/0015-worker-presences';
import * as scaleOutCopies from './migrations/0016-scale-out-copies';

interface MigrationModule {
  up(queryInterface: QueryInterface, transaction: Transaction): Promise<void>;
  down(queryInterface: QueryInterface, transaction: Transaction): Promise<void>;
}

/** Every migration in order; imported statically so tsx, vitest and a bundler all find them. */
const MIGRATIONS: [name: string, module: MigrationModule][] = [
  ['0001-foundation', foundation],
  ['0002-people-mail', peopleMail],
  ['0003-ingest', ingest],
  ['0004-pipeline', pipeline],
  ['0005-motion', motion],
  ['0006-review', review],
  ['0007-pairsets', pairsets],
  ['0008-admin', admin],
  ['0009-clip-list-order', clipListOrder],
  ['0010-motion-scale', motionScale],
  ['0011-cut-marks', cutMarks],
  ['0012-storage-diet', storageDiet],
  ['0013-diversity', diversity],
  ['0014-job-timing', jobTiming],
  ['0015-worker-presences', workerPresences],
  ['0016-scale-out-copies', scaleOutCopies],
];

/** The name of every migration, in order: what a database that is up to date has run. */
export const MIGRATION_NAMES: readonly string[] = MIGRATIONS.map(([name]) => name);

/** Runs each migration inside its own transaction, so a failed step leaves the schema as it was. */
export function createMigrator(sequelize: Sequelize, logger: Console | undefined = undefined) {
  return new Umzug({
    migrations: MIGRATIONS.map(([name, module]) => ({
      name,
      up: () => sequelize.transaction((transaction) => module.up(sequelize.getQueryInterface(), transaction)),
      down: () => sequelize.transaction((transaction) => module.down(sequelize.getQueryInterface(), transaction)),
    })),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger,
  });
}
