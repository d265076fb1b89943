import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { ApiTokenSummary } from '../../../shared/types/pairsets';
import type { User } from './user.model';

/** A named token an engineer's scripts download pairsets with; only its prefix and a SHA-256 of it are kept. */
export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare name: string;
  declare prefix: string;
  declare tokenHash: string;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;

  declare user?: NonAttribute<User>;

  toApi(): ApiTokenSummary {
    return {
      id: this.id,
      name: this.name,
      prefix: this.prefix,
      lastUsedAt: this.lastUsedAt?.toISOString() ?? null,
      revokedAt: this.revokedAt?.toISOString() ?? null,
      createdAt: this.createdAt.toISOString(),
    };
  }

  static initModel(sequelize: Sequelize): void {
    ApiToken.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(100), allowNull: false },
        prefix: { type: DataTypes.STRING(24), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false },
        lastUsedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'api_tokens', updatedAt: false },
    );
  }
}
