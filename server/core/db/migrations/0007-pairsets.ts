import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** Pairsets and their shards (DESIGN §4, §7), and the API tokens engineers download them with. */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.createTable(
    'pairsets',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(200), allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      definition: { type: DataTypes.JSON, allowNull: false },
      state: { type: DataTypes.STRING(16), allowNull: false },
      progress: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
      stats: { type: DataTypes.JSON, allowNull: true },
      difficulty: { type: DataTypes.JSON, allowNull: true },
      bytes: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
      // Who built it (the bytes count against them); until the first build, who defined it.
      ownerId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
      seed: { type: DataTypes.INTEGER, allowNull: false },
      error: { type: DataTypes.TEXT, allowNull: true },
      builtAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: { type: DataTypes.DATE, allowNull: false },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  // Versions of one name are numbered 1, 2, …; two versions can never share a number.
  await queryInterface.addIndex('pairsets', ['name', 'version'], { unique: true, transaction });
  await queryInterface.addIndex('pairsets', ['ownerId'], { transaction });
  await queryInterface.addIndex('pairsets', ['state', 'createdAt'], { transaction });

  await queryInterface.createTable(
    'shards',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      pairsetId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'pairsets', key: 'id' },
        onDelete: 'CASCADE',
      },
      index: { type: DataTypes.INTEGER, allowNull: false },
      split: { type: DataTypes.STRING(8), allowNull: false },
      pairCount: { type: DataTypes.INTEGER, allowNull: false },
      bytes: { type: DataTypes.BIGINT, allowNull: false },
      sha256: { type: DataTypes.STRING(64), allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('shards', ['pairsetId', 'index'], { unique: true, transaction });

  await queryInterface.createTable(
    'api_tokens',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      userId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
      },
      name: { type: DataTypes.STRING(100), allowNull: false },
      prefix: { type: DataTypes.STRING(24), allowNull: false },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false },
      lastUsedAt: { type: DataTypes.DATE, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  // The prefix finds the row; the hash of the whole token proves it.
  await queryInterface.addIndex('api_tokens', ['prefix'], { unique: true, transaction });
  await queryInterface.addIndex('api_tokens', ['userId', 'createdAt'], { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  for (const table of ['api_tokens', 'shards', 'pairsets']) await queryInterface.dropTable(table, { transaction });
}
