import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A quota threshold (80 or 100 %) that a project or user has crossed; gone again once usage falls below it. */
export class QuotaWarning extends Model<InferAttributes<QuotaWarning>, InferCreationAttributes<QuotaWarning>> {
  declare id: CreationOptional<number>;
  declare scope: 'project' | 'user';
  declare scopeId: number;
  declare percent: number;
  declare crossedAt: Date;

  static initModel(sequelize: Sequelize): void {
    QuotaWarning.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        scope: { type: DataTypes.STRING(16), allowNull: false },
        scopeId: { type: DataTypes.INTEGER, allowNull: false },
        percent: { type: DataTypes.INTEGER, allowNull: false },
        crossedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'quota_warnings', timestamps: false },
    );
  }
}
