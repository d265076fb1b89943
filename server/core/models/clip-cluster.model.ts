import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A moment the clustering did not see (written after it ran, or without a descriptor). */
export const NO_CLUSTER = 255;

/**
 * One clip's assignments in a clustering: each moment's cluster as one byte (NO_CLUSTER for none), and the clip's
 * own cluster, the one most of its moments fall in (the lower on a tie).
 */
export class ClipCluster extends Model<InferAttributes<ClipCluster>, InferCreationAttributes<ClipCluster>> {
  declare id: CreationOptional<number>;
  declare clusteringId: number;
  declare clipId: number;
  declare cluster: number;
  declare labels: Buffer;

  /** Frame t's cluster, or null when the clustering has none for it. */
  momentCluster(t: number): number | null {
    const label = t < this.labels.length ? this.labels[t]! : NO_CLUSTER;
    return label === NO_CLUSTER ? null : label;
  }

  static initModel(sequelize: Sequelize): void {
    ClipCluster.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        clusteringId: { type: DataTypes.INTEGER, allowNull: false },
        clipId: { type: DataTypes.INTEGER, allowNull: false },
        cluster: { type: DataTypes.INTEGER, allowNull: false },
        labels: { type: DataTypes.BLOB, allowNull: false },
      },
      { sequelize, tableName: 'clip_clusters', timestamps: false },
    );
  }
}
