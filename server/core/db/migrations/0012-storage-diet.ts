import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * Columns are added with `ALTER TABLE … ADD COLUMN` (addColumn), never by rebuilding `clips` (README, Review).
 * How each clip's derived files are stored (storage/paths.ts, DERIVED_FORMATS): clips processed before this step
 * are `original` until the compact-storage job converts them; and the derived bytes predicted at admission, held
 * against the quotas until processing measures the real ones.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.addColumn(
    'clips',
    'derivedFormat',
    { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'original' },
    { transaction },
  );
  await queryInterface.addColumn(
    'clips',
    'predictedDerivedBytes',
    { type: DataTypes.BIGINT, allowNull: true },
    { transaction },
  );
}

/** `DROP COLUMN`, never Sequelize's removeColumn: on SQLite that rebuilds the table and drops its triggers. */
export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.sequelize.query('ALTER TABLE clips DROP COLUMN "predictedDerivedBytes"', { transaction });
  await queryInterface.sequelize.query('ALTER TABLE clips DROP COLUMN "derivedFormat"', { transaction });
}
