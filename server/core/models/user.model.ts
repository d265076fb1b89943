import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { UserSummary } from '../../../shared/api-types';
import type { Role } from '../../../shared/roles';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare role: Role;
  declare passwordHash: string;
  declare disabled: CreationOptional<boolean>;
  declare quotaBytes: CreationOptional<number | null>;
  declare lastSignInAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static findByEmail(email: string): Promise<User | null> {
    return User.findOne({ where: { email: email.trim().toLowerCase() } });
  }

  static countActiveAdmins(): Promise<number> {
    return User.count({ where: { role: 'admin', disabled: false } });
  }

  toApi(): UserSummary {
    return {
      id: this.id,
      email: this.email,
      name: this.name,
      role: this.role,
      disabled: this.disabled,
      quotaBytes: this.quotaBytes === null ? null : Number(this.quotaBytes),
      lastSignInAt: this.lastSignInAt?.toISOString() ?? null,
      createdAt: this.createdAt.toISOString(),
    };
  }

  static initModel(sequelize: Sequelize): void {
    User.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        email: { type: DataTypes.STRING(320), allowNull: false, unique: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        role: { type: DataTypes.STRING(16), allowNull: false },
        passwordHash: { type: DataTypes.STRING(100), allowNull: false },
        disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        quotaBytes: { type: DataTypes.BIGINT, allowNull: true },
        lastSignInAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'users' },
    );
  }
}
