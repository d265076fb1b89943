import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** Daily usage snapshots (the 30-day trend), quota threshold crossings (one mail each), and retention per project. */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'usage_snapshots',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      day: { type: DataTypes.STRING(10), allowNull: false, unique: true },
      totalBytes: { type: DataTypes.BIGINT, allowNull: false },
      byKind: { type: DataTypes.JSON, allowNull: false },
      drift: { type: DataTypes.JSON, allowNull: false },
      takenAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.createTable(
    'quota_warnings',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      scope: { type: DataTypes.STRING(16), allowNull: false },
      scopeId: { type: DataTypes.INTEGER, allowNull: false },
      percent: { type: DataTypes.INTEGER, allowNull: false },
      crossedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('quota_warnings', ['scope', 'scopeId', 'percent'], { unique: true, transaction });
  await queryInterface.addColumn(
    'projects',
    'retentionDays',
    { type: DataTypes.INTEGER, allowNull: true },
    { transaction },
  );
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.removeColumn('projects', 'retentionDays', { transaction });
  await queryInterface.dropTable('quota_warnings', { transaction });
  await queryInterface.dropTable('usage_snapshots', { transaction });
}
