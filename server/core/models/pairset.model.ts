import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { PairsetDefinition, PairsetState } from '../../../shared/schemas/pairsets';
import type { PairsetDifficulty, PairsetStatistics, PairsetSummary } from '../../../shared/types/pairsets';
import type { User } from './user.model';

/** An immutable, versioned export of view pairs from accepted clips (DESIGN §2), written as tar shards. */
export class Pairset extends Model<InferAttributes<Pairset>, InferCreationAttributes<Pairset>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare version: number;
  /** The definition as validated, defaults filled in, so a rebuild never depends on today's defaults. */
  declare definition: PairsetDefinition;
  declare state: PairsetState;
  declare progress: CreationOptional<number>;
  declare stats: CreationOptional<PairsetStatistics | null>;
  declare difficulty: CreationOptional<PairsetDifficulty | null>;
  /** Bytes of the pairset's folder once built; they count against the owner's quota. */
  declare bytes: CreationOptional<number>;
  /** Who built it (its bytes are theirs); until the first build, who defined it. */
  declare ownerId: number;
  declare seed: number;
  declare error: CreationOptional<string | null>;
  declare builtAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare owner?: NonAttribute<User>;

  toApi(): PairsetSummary {
    return {
      id: this.id,
      name: this.name,
      version: this.version,
      state: this.state,
      progress: this.progress,
      bytes: Number(this.bytes),
      ownerId: this.ownerId,
      ownerName: this.owner?.name ?? '',
      seed: this.seed,
      shardCount: Number(this.getDataValue('shardCount' as never) ?? 0),
      pairCount: this.stats?.pairs.total ?? 0,
      error: this.error,
      createdAt: this.createdAt.toISOString(),
      builtAt: this.builtAt?.toISOString() ?? null,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Pairset.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false },
        definition: { type: DataTypes.JSON, allowNull: false },
        state: { type: DataTypes.STRING(16), allowNull: false },
        progress: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
        stats: { type: DataTypes.JSON, allowNull: true },
        difficulty: { type: DataTypes.JSON, allowNull: true },
        bytes: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
        ownerId: { type: DataTypes.INTEGER, allowNull: false },
        seed: { type: DataTypes.INTEGER, allowNull: false },
        error: { type: DataTypes.TEXT, allowNull: true },
        builtAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'pairsets' },
    );
  }
}
