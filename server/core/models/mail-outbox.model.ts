import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/**
 * `pending` waits for its nextAttemptAt; `sending` is claimed by a sender until leaseExpiresAt;
 * `sent` and `failed` are final.
 */
export type MailOutboxState = 'pending' | 'sending' | 'sent' | 'failed';

/** A message waiting to be sent, written in the same transaction as the change that causes it. */
export class MailOutbox extends Model<InferAttributes<MailOutbox>, InferCreationAttributes<MailOutbox>> {
  declare id: CreationOptional<number>;
  /** Stays the same across retries, so a receiver can tell a repeated delivery from a new message. */
  declare messageId: string;
  declare template: string;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare state: CreationOptional<MailOutboxState>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare leaseExpiresAt: CreationOptional<Date | null>;
  declare sentAt: CreationOptional<Date | null>;
  /** The SMTP server's answer on success, or what went wrong on the last attempt. */
  declare result: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    MailOutbox.init(
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
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'mail_outbox' },
    );
  }
}
