import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One thing a person (or the system, when actorId is null) did, kept for the audit log. */
export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare actorId: number | null;
  declare action: string;
  declare targetType: string;
  declare targetId: string | null;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare at: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    AuditEvent.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        actorId: { type: DataTypes.INTEGER, allowNull: true },
        action: { type: DataTypes.STRING(64), allowNull: false },
        targetType: { type: DataTypes.STRING(32), allowNull: false },
        targetId: { type: DataTypes.STRING(64), allowNull: true },
        detail: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      },
      { sequelize, tableName: 'audit_events', timestamps: false },
    );
  }
}
