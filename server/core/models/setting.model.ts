import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One installation-wide setting an admin edits on screen (e.g. the reject-reasons list), as JSON under a key. */
export class Setting extends Model<InferAttributes<Setting>, InferCreationAttributes<Setting>> {
  declare key: string;
  declare value: unknown;
  declare updatedById: number | null;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Setting.init(
      {
        key: { type: DataTypes.STRING(64), primaryKey: true },
        value: { type: DataTypes.JSON, allowNull: false },
        updatedById: { type: DataTypes.INTEGER, allowNull: true },
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'settings', createdAt: false },
    );
  }
}
