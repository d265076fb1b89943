import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ClusteringState, ClusteringSummary, SilhouetteOfK } from '../../../shared/types/diversity';

/** Per-dimension mean and standard deviation the descriptors were standardised with before k-means. */
export interface DescriptorScaling {
  mean: number[];
  sd: number[];
}

/**
 * One k-means run over the moments of a set of projects (the cluster-moments job). k is the engineer's, or the
 * one of highest silhouette when none was asked for. Centres are in standardised units (see scaling).
 */
export class Clustering extends Model<InferAttributes<Clustering>, InferCreationAttributes<Clustering>> {
  declare id: CreationOptional<number>;
  declare projectIds: number[];
  declare requestedK: number | null;
  declare k: CreationOptional<number | null>;
  declare seed: number;
  declare restarts: number;
  declare state: ClusteringState;
  declare momentCount: CreationOptional<number | null>;
  declare inertia: CreationOptional<number | null>;
  declare silhouettes: CreationOptional<SilhouetteOfK[] | null>;
  declare scaling: CreationOptional<DescriptorScaling | null>;
  declare centres: CreationOptional<number[][] | null>;
  /** Moments per cluster. */
  declare sizes: CreationOptional<number[] | null>;
  declare error: CreationOptional<string | null>;
  declare createdById: number;
  declare createdAt: CreationOptional<Date>;
  declare doneAt: CreationOptional<Date | null>;

  toApi(): ClusteringSummary {
    return {
      id: this.id,
      projectIds: this.projectIds,
      requestedK: this.requestedK,
      k: this.k,
      seed: this.seed,
      restarts: this.restarts,
      state: this.state,
      momentCount: this.momentCount,
      inertia: this.inertia,
      silhouettes: this.silhouettes ?? [],
      sizes: this.sizes ?? [],
      error: this.error,
      createdAt: this.createdAt.toISOString(),
      doneAt: this.doneAt?.toISOString() ?? null,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Clustering.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        projectIds: { type: DataTypes.JSON, allowNull: false },
        requestedK: { type: DataTypes.INTEGER, allowNull: true },
        k: { type: DataTypes.INTEGER, allowNull: true },
        seed: { type: DataTypes.INTEGER, allowNull: false },
        restarts: { type: DataTypes.INTEGER, allowNull: false },
        state: { type: DataTypes.STRING(12), allowNull: false },
        momentCount: { type: DataTypes.INTEGER, allowNull: true },
        inertia: { type: DataTypes.FLOAT, allowNull: true },
        silhouettes: { type: DataTypes.JSON, allowNull: true },
        scaling: { type: DataTypes.JSON, allowNull: true },
        centres: { type: DataTypes.JSON, allowNull: true },
        sizes: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        doneAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'clusterings', timestamps: false },
    );
  }
}
