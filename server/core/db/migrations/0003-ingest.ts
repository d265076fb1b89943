import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** Clips with their probe and capture metadata, the jobs table the worker claims from, and quota reservations. */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const timestamps = {
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  };
  await queryInterface.createTable(
    'clips',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      projectId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'projects', key: 'id' } },
      uploaderId: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
      originalName: { type: DataTypes.STRING(400), allowNull: false },
      sizeBytes: { type: DataTypes.BIGINT, allowNull: false },
      storedBytes: { type: DataTypes.BIGINT, allowNull: false },
      sha256: { type: DataTypes.STRING(64), allowNull: false },
      sourceExt: { type: DataTypes.STRING(8), allowNull: false },
      state: { type: DataTypes.STRING(24), allowNull: false },
      stage: { type: DataTypes.STRING(24), allowNull: true },
      error: { type: DataTypes.TEXT, allowNull: true },
      container: { type: DataTypes.STRING(64), allowNull: false },
      codec: { type: DataTypes.STRING(32), allowNull: false },
      durationS: { type: DataTypes.FLOAT, allowNull: false },
      fps: { type: DataTypes.FLOAT, allowNull: false },
      width: { type: DataTypes.INTEGER, allowNull: false },
      height: { type: DataTypes.INTEGER, allowNull: false },
      rotation: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      site: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
      rig: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
      capturedAt: { type: DataTypes.DATE, allowNull: true },
      tags: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
      notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      flags: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
      claimedBy: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
      },
      claimExpiresAt: { type: DataTypes.DATE, allowNull: true },
      purgedAt: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    },
    { transaction },
  );
  // One file per project: an exact re-upload is answered with the clip that already holds it.
  await queryInterface.addIndex('clips', ['projectId', 'sha256'], { unique: true, transaction });
  await queryInterface.addIndex('clips', ['state', 'createdAt'], { transaction });
  await queryInterface.addIndex('clips', ['uploaderId', 'createdAt'], { transaction });
  await queryInterface.addIndex('clips', ['projectId', 'createdAt'], { transaction });
  await queryInterface.addIndex('clips', ['capturedAt'], { transaction });

  await queryInterface.createTable(
    'jobs',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      kind: { type: DataTypes.STRING(32), allowNull: false },
      clipId: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'clips', key: 'id' },
        onDelete: 'CASCADE',
      },
      pairsetId: { type: DataTypes.INTEGER, allowNull: true },
      payload: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
      state: { type: DataTypes.STRING(16), allowNull: false },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      leaseOwner: { type: DataTypes.STRING(100), allowNull: true },
      leaseExpiresAt: { type: DataTypes.DATE, allowNull: true },
      stage: { type: DataTypes.STRING(24), allowNull: true },
      progress: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
      error: { type: DataTypes.TEXT, allowNull: true },
      runAfter: { type: DataTypes.DATE, allowNull: false },
      finishedAt: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    },
    { transaction },
  );
  await queryInterface.addIndex('jobs', ['state', 'runAfter'], { transaction });
  await queryInterface.addIndex('jobs', ['clipId'], { transaction });

  await queryInterface.createTable(
    'upload_reservations',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      projectId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'projects', key: 'id' },
        onDelete: 'CASCADE',
      },
      userId: {
        type: DataTypes.INTEGER,
        allowNull: false,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
      },
      bytes: { type: DataTypes.BIGINT, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  for (const table of ['upload_reservations', 'jobs', 'clips']) await queryInterface.dropTable(table, { transaction });
}
