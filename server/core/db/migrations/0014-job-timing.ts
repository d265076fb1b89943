import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * When a job's latest attempt started and which worker ran it, so the Jobs screen can show start, finish, duration
 * and worker after the lease is let go. `ALTER TABLE … ADD/DROP COLUMN` (addColumn adds in place), never a rebuild.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.addColumn('jobs', 'startedAt', { type: DataTypes.DATE, allowNull: true }, { transaction });
  await queryInterface.addColumn(
    'jobs',
    'lastWorker',
    { type: DataTypes.STRING(100), allowNull: true },
    { transaction },
  );
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE jobs DROP COLUMN "lastWorker"', { transaction });
  await queryInterface.sequelize.query('ALTER TABLE jobs DROP COLUMN "startedAt"', { transaction });
}
