import type { QueryInterface, Transaction } from 'sequelize';

/**
 * When a job's latest attempt started and which worker ran it, so the Jobs screen can show start, finish, duration
 * and worker after the lease is let go. `ALTER TABLE … ADD/DROP COLUMN`, never a rebuild.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE jobs ADD COLUMN startedAt DATETIME', { transaction });
  await queryInterface.sequelize.query('ALTER TABLE jobs ADD COLUMN lastWorker VARCHAR(100)', { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE jobs DROP COLUMN lastWorker', { transaction });
  await queryInterface.sequelize.query('ALTER TABLE jobs DROP COLUMN startedAt', { transaction });
}
