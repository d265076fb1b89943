import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A browser session as connect-session-sequelize stores it, plus the signed-in user so sessions can be ended. */
export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
  declare sid: string;
  declare userId: number | null;
  declare expires: Date | null;
  declare data: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Session.init(
      {
        sid: { type: DataTypes.STRING(64), primaryKey: true },
        userId: { type: DataTypes.INTEGER, allowNull: true },
        expires: { type: DataTypes.DATE, allowNull: true },
        data: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'sessions', modelName: 'Session' },
    );
  }
}
