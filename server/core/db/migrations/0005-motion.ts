import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * What the Motion stage adds: one row per motion field, forward (frame t → t+1) and backward (t+1 → t), with the
 * estimator and the full parameters it ran with and the field's summary figures.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'motion_fields',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      clipId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
      },
      fromIndex: { type: DataTypes.INTEGER, allowNull: false },
      toIndex: { type: DataTypes.INTEGER, allowNull: false },
      direction: { type: DataTypes.STRING(8), allowNull: false },
      estimator: { type: DataTypes.STRING(32), allowNull: false },
      params: { type: DataTypes.JSON, allowNull: false },
      meanMagnitude: { type: DataTypes.FLOAT, allowNull: false },
      p95Magnitude: { type: DataTypes.FLOAT, allowNull: false },
      consistentShare: { type: DataTypes.FLOAT, allowNull: false },
      medianU: { type: DataTypes.FLOAT, allowNull: false },
      medianV: { type: DataTypes.FLOAT, allowNull: false },
      maxMagnitude: { type: DataTypes.FLOAT, allowNull: false },
    },
    { transaction },
  );
  // One row per field: the stage redone after a crash or a reprocess replaces rows, it can never add a second one.
  await queryInterface.addIndex('motion_fields', ['clipId', 'fromIndex', 'toIndex', 'direction'], {
    unique: true,
    transaction,
  });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('motion_fields', { transaction });
}
