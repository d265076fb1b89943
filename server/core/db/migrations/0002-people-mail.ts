import { DataTypes, type QueryInterface, type Transaction } from 'sequelize';

/** Invitations, password-reset links, the mail outbox and what the local fake SMTP server received. */
export async function up(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  const user = (onDelete: 'CASCADE' | 'SET NULL') => ({ model: 'users', key: 'id', onDelete });

  await queryInterface.createTable(
    'invitations',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: { type: DataTypes.STRING(320), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      acceptedAt: { type: DataTypes.DATE, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      invitedById: { type: DataTypes.INTEGER, allowNull: true, references: user('SET NULL') },
      lastSentAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  // At most one open invitation per address, even when two admins invite the same person at once.
  await queryInterface.addIndex('invitations', ['email'], {
    name: 'invitations_one_open_per_email',
    unique: true,
    where: { acceptedAt: null, revokedAt: null },
    transaction,
  });

  await queryInterface.createTable(
    'password_resets',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      userId: { type: DataTypes.INTEGER, allowNull: false, references: user('CASCADE') },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      usedAt: { type: DataTypes.DATE, allowNull: true },
      requestedById: { type: DataTypes.INTEGER, allowNull: true, references: user('SET NULL') },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('password_resets', ['userId'], { transaction });

  await queryInterface.createTable(
    'mail_outbox',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      messageId: { type: DataTypes.STRING(200), allowNull: false, unique: true },
      template: { type: DataTypes.STRING(64), allowNull: false },
      to: { type: DataTypes.STRING(320), allowNull: false },
      subject: { type: DataTypes.STRING(300), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      html: { type: DataTypes.TEXT, allowNull: false },
      state: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'pending' },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: false },
      leaseExpiresAt: { type: DataTypes.DATE, allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      result: { type: DataTypes.TEXT, allowNull: true },
      createdAt: { type: DataTypes.DATE, allowNull: false },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  // The sender's claim looks rows up by state and due time.
  await queryInterface.addIndex('mail_outbox', ['state', 'nextAttemptAt'], { transaction });

  await queryInterface.createTable(
    'mail_messages',
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      messageId: { type: DataTypes.STRING(200), allowNull: true },
      from: { type: DataTypes.STRING(320), allowNull: false },
      to: { type: DataTypes.TEXT, allowNull: false },
      subject: { type: DataTypes.STRING(300), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      html: { type: DataTypes.TEXT, allowNull: false },
      at: { type: DataTypes.DATE, allowNull: false },
    },
    { transaction },
  );
  await queryInterface.addIndex('mail_messages', ['at'], { transaction });
}

export async function down(queryInterface: QueryInterface, transaction: Transaction): Promise<void> {
  for (const table of ['mail_messages', 'mail_outbox', 'password_resets', 'invitations']) {
    await queryInterface.dropTable(table, { transaction });
  }
}
