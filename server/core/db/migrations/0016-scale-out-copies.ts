import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * What `npm run migrate:scale-out` has copied from a SQLite installation into this database: one row per table,
 * written in the same transaction as the table's rows, so a copy stopped anywhere is resumed table by table and a
 * database holding another installation's data is recognised (server/core/db/scale-out/). Empty on SQLite.
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'scale_out_copies',
    {
      tableName: { type: DataTypes.STRING(64), primaryKey: true },
      // A digest of the source installation's first account (id, e-mail, creation time): same installation, same key.
      sourceKey: { type: DataTypes.STRING(64), allowNull: false },
      // The source table as copied: its row count and highest rowid, to notice a source that changed since.
      rowCount: { type: DataTypes.BIGINT, allowNull: false },
      lastRowid: { type: DataTypes.BIGINT, allowNull: false },
      copiedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('scale_out_copies', { transaction });
}
