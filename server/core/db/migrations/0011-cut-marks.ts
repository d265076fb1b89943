import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * The cut detector's evidence per frame (what it measured against the frame before, what fired, what it decided),
 * and curators' cut marks: one per frame at most, overriding the detector there.
 * `ALTER TABLE … ADD/DROP COLUMN` on frames, never a rebuild (README, Review: the table keeps its indexes).
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE frames ADD COLUMN "cutEvidence" JSON', { transaction });
  await queryInterface.createTable(
    'cut_marks',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      clipId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
      },
      frameIndex: { type: DataTypes.INTEGER, allowNull: false },
      value: { type: DataTypes.STRING(8), allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: false },
      markedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('cut_marks', ['clipId', 'frameIndex'], { unique: true, transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('cut_marks', { transaction });
  await queryInterface.sequelize.query('ALTER TABLE frames DROP COLUMN "cutEvidence"', { transaction });
}
