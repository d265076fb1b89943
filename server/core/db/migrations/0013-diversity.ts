import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/**
 * Diversity: moment descriptors (one row per clip, Float32 blobs), clusterings of moments (k-means runs over
 * projects) and each clustering's assignments (one row per clip: its moments' cluster labels as bytes).
 */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const clipRef = {
    type: DataTypes.INTEGER,
    allowNull: false,
    references: { model: 'clips', key: 'id' },
    onDelete: 'CASCADE',
  };
  await queryInterface.createTable(
    'moment_descriptors',
    {
      clipId: { ...clipRef, primaryKey: true },
      frameCount: { type: DataTypes.INTEGER, allowNull: false },
      appearance: { type: DataTypes.BLOB, allowNull: false },
      motion: { type: DataTypes.BLOB, allowNull: true },
    },
    { transaction },
  );
  await queryInterface.createTable(
    'clusterings',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      projectIds: { type: DataTypes.JSON, allowNull: false },
      requestedK: { type: DataTypes.INTEGER, allowNull: true },
      k: { type: DataTypes.INTEGER, allowNull: true },
      seed: { type: DataTypes.INTEGER, allowNull: false },
      restarts: { type: DataTypes.INTEGER, allowNull: false },
      state: { type: DataTypes.STRING(12), allowNull: false },
      momentCount: { type: DataTypes.INTEGER, allowNull: true },
      inertia: { type: DataTypes.FLOAT, allowNull: true },
      silhouettes: { type: DataTypes.JSON, allowNull: true },
      scaling: { type: DataTypes.JSON, allowNull: true },
      centres: { type: DataTypes.JSON, allowNull: true },
      sizes: { type: DataTypes.JSON, allowNull: true },
      error: { type: DataTypes.TEXT, allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
      doneAt: { type: DataTypes.DATE, allowNull: true },
    },
    { transaction },
  );
  await queryInterface.createTable(
    'clip_clusters',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      clusteringId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'clusterings', key: 'id' },
        onDelete: 'CASCADE',
      },
      clipId: clipRef,
      cluster: { type: DataTypes.INTEGER, allowNull: false },
      labels: { type: DataTypes.BLOB, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('clip_clusters', ['clusteringId', 'clipId'], { unique: true, transaction });
  await queryInterface.addIndex('clip_clusters', ['clusteringId', 'cluster'], { transaction });
  await queryInterface.addIndex('clip_clusters', ['clipId'], { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  await queryInterface.dropTable('clip_clusters', { transaction });
  await queryInterface.dropTable('clusterings', { transaction });
  await queryInterface.dropTable('moment_descriptors', { transaction });
}
