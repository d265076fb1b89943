import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** Users, projects, the audit trail and browser sessions: what sign-in and the shell need. */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const timestamps = {
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  };
  await queryInterface.createTable(
    'users',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: { type: DataTypes.STRING(320), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(200), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      passwordHash: { type: DataTypes.STRING(100), allowNull: false },
      disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      quotaBytes: { type: DataTypes.BIGINT, allowNull: true },
      lastSignInAt: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    },
    { transaction },
  );
  await queryInterface.addIndex('users', ['role'], { transaction });

  await queryInterface.createTable(
    'projects',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(200), allowNull: false, unique: true },
      description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      quotaBytes: { type: DataTypes.BIGINT, allowNull: true },
      estimator: { type: DataTypes.STRING(32), allowNull: false },
      estimatorParams: { type: DataTypes.JSON, allowNull: false },
      sampleFps: { type: DataTypes.FLOAT, allowNull: false },
      workingSize: { type: DataTypes.INTEGER, allowNull: false },
      deltas: { type: DataTypes.JSON, allowNull: false },
      flagThresholds: { type: DataTypes.JSON, allowNull: false },
      ...timestamps,
    },
    { transaction },
  );

  await queryInterface.createTable(
    'audit_events',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      actorId: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'SET NULL',
      },
      action: { type: DataTypes.STRING(64), allowNull: false },
      targetType: { type: DataTypes.STRING(32), allowNull: false },
      targetId: { type: DataTypes.STRING(64), allowNull: true },
      detail: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
      at: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('audit_events', ['at'], { transaction });
  await queryInterface.addIndex('audit_events', ['targetType', 'targetId'], { transaction });

  await queryInterface.createTable(
    'sessions',
    {
      sid: { type: DataTypes.STRING(64), primaryKey: true },
      userId: {
        type: DataTypes.INTEGER,
        allowNull: true,
        references: { model: 'users', key: 'id' },
        onDelete: 'CASCADE',
      },
      expires: { type: DataTypes.DATE, allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: true },
      ...timestamps,
    },
    { transaction },
  );
  await queryInterface.addIndex('sessions', ['userId'], { transaction });
  await queryInterface.addIndex('sessions', ['expires'], { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  for (const table of ['sessions', 'audit_events', 'projects', 'users']) {
    await queryInterface.dropTable(table, { transaction });
  }
}
