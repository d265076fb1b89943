import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** What processing adds: one row per sampled frame with its signals, and a clip's counts and flag details. */
const CLIP_COLUMNS = {
  frameCount: { type: DataTypes.INTEGER, allowNull: true },
  cutCount: { type: DataTypes.INTEGER, allowNull: true },
  /** Each raised flag with the measure, its value, the threshold that raised it and a message. */
  flagDetails: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
  medianSharpness: { type: DataTypes.FLOAT, allowNull: true },
  meanLuma: { type: DataTypes.FLOAT, allowNull: true },
  hasPreview: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
  hasThumbnail: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
} as const;

export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'frames',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      clipId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
      },
      index: { type: DataTypes.INTEGER, allowNull: false },
      timeS: { type: DataTypes.FLOAT, allowNull: false },
      // Signals stay null from the sample stage until the signals stage has measured the frame.
      meanLuma: { type: DataTypes.FLOAT, allowNull: true },
      contrast: { type: DataTypes.FLOAT, allowNull: true },
      sharpness: { type: DataTypes.FLOAT, allowNull: true },
      clippedShare: { type: DataTypes.FLOAT, allowNull: true },
      clippedHighShare: { type: DataTypes.FLOAT, allowNull: true },
      cutBefore: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      cutScore: { type: DataTypes.FLOAT, allowNull: true },
      dhash: { type: DataTypes.STRING(16), allowNull: true },
    },
    { transaction },
  );
  // One row per frame: a stage redone after a crash replaces rows, it can never add a second one.
  await queryInterface.addIndex('frames', ['clipId', 'index'], { unique: true, transaction });

  for (const [column, definition] of Object.entries(CLIP_COLUMNS)) {
    await queryInterface.addColumn('clips', column, definition, { transaction });
  }
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('frames', { transaction });
  // SQLite's own DROP COLUMN: Sequelize's removeColumn rebuilds the table, and dropping the old clips table
  // would cascade into jobs with foreign keys on.
  for (const column of Object.keys(CLIP_COLUMNS).reverse()) {
    await queryInterface.sequelize.query(`ALTER TABLE clips DROP COLUMN "${column}"`, { transaction });
  }
}
