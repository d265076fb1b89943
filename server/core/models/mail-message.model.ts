import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { MailLogEntry } from '../../../shared/api-types';

/** A message the local fake SMTP server received; the mail log (and the tests) read these. */
export class MailMessage extends Model<InferAttributes<MailMessage>, InferCreationAttributes<MailMessage>> {
  declare id: CreationOptional<number>;
  declare messageId: string | null;
  declare from: string;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare at: CreationOptional<Date>;

  toApi(): MailLogEntry {
    return {
      id: this.id,
      to: this.to,
      subject: this.subject,
      text: this.text,
      html: this.html,
      at: this.at.toISOString(),
    };
  }

  static initModel(sequelize: Sequelize): void {
    MailMessage.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        messageId: { type: DataTypes.STRING(200), allowNull: true },
        from: { type: DataTypes.STRING(320), allowNull: false },
        to: { type: DataTypes.TEXT, allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: false },
        at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'mail_messages', timestamps: false },
    );
  }
}
