import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * Worker processes announce themselves here (host, pid, version) and beat every third of a lease with the number
 * of jobs they run, so the Jobs screen shows every worker, wherever it runs, and which have gone quiet.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'worker_presences',
    {
      // The worker's lease-owner name (host:pid:random), the same string its jobs carry in `leaseOwner`.
      name: { type: DataTypes.STRING(100), primaryKey: true },
      host: { type: DataTypes.STRING(200), allowNull: false },
      pid: { type: DataTypes.INTEGER, allowNull: false },
      version: { type: DataTypes.STRING(32), allowNull: false },
      // The worker's own lease: it beats every third of it, and is stale once a whole lease passes without a beat.
      leaseS: { type: DataTypes.INTEGER, allowNull: false },
      jobsRunning: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      startedAt: { type: DataTypes.DATE, allowNull: false },
      lastBeatAt: { type: DataTypes.DATE, allowNull: false },
      stoppedAt: { type: DataTypes.DATE, allowNull: true },
    },
    { transaction },
  );
  await queryInterface.addIndex('worker_presences', ['lastBeatAt'], { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('worker_presences', { transaction });
}
