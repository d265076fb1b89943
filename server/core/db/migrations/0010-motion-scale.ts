import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * The 95th-percentile magnitude over consistent pixels of each motion field, from which the clip's motion colour
 * scale is taken (shared/motion/motion-scale.ts). Null on fields stored before it; they fall back to p95Magnitude.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.addColumn(
    'motion_fields',
    'consistentP95Magnitude',
    { type: DataTypes.FLOAT, allowNull: true },
    { transaction },
  );
}

/** DROP COLUMN rather than Sequelize's removeColumn, which rebuilds the table on SQLite. */
export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE motion_fields DROP COLUMN "consistentP95Magnitude"', {
    transaction,
  });
}
