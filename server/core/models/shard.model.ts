import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { shardFileName } from '../../../shared/pairing/shard-name';
import type { SplitName } from '../../../shared/pairing/split';
import type { ShardSummary } from '../../../shared/types/pairsets';

/** One tar file of a built pairset (DESIGN §7); `index` is its place in the pairset's one shard sequence. */
export class Shard extends Model<InferAttributes<Shard>, InferCreationAttributes<Shard>> {
  declare id: CreationOptional<number>;
  declare pairsetId: number;
  declare index: number;
  declare split: SplitName;
  declare pairCount: number;
  declare bytes: number;
  declare sha256: string;

  fileName(): string {
    return shardFileName(this.split, this.index);
  }

  toApi(): ShardSummary {
    return {
      index: this.index,
      file: this.fileName(),
      split: this.split,
      pairCount: this.pairCount,
      bytes: Number(this.bytes),
      sha256: this.sha256,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Shard.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        pairsetId: { type: DataTypes.INTEGER, allowNull: false },
        index: { type: DataTypes.INTEGER, allowNull: false },
        split: { type: DataTypes.STRING(8), allowNull: false },
        pairCount: { type: DataTypes.INTEGER, allowNull: false },
        bytes: { type: DataTypes.BIGINT, allowNull: false },
        sha256: { type: DataTypes.STRING(64), allowNull: false },
      },
      { sequelize, tableName: 'shards', timestamps: false },
    );
  }
}
