import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { JobKind, JobPayload, JobState } from '../../../shared/jobs';

/** A unit of worker work, claimed with a lease so a crashed worker's job is taken up again (DESIGN §4–5). */
export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<number>;
  declare kind: JobKind;
  declare clipId: number | null;
  declare pairsetId: CreationOptional<number | null>;
  declare payload: JobPayload;
  declare state: JobState;
  declare attempts: CreationOptional<number>;
  declare leaseOwner: CreationOptional<string | null>;
  declare leaseExpiresAt: CreationOptional<Date | null>;
  declare stage: CreationOptional<string | null>;
  declare progress: CreationOptional<number>;
  declare error: CreationOptional<string | null>;
  declare runAfter: Date;
  declare finishedAt: CreationOptional<Date | null>;
  /** When the latest attempt was claimed, and by which worker (kept after the lease is let go). */
  declare startedAt: CreationOptional<Date | null>;
  declare lastWorker: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Job.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        kind: { type: DataTypes.STRING(32), allowNull: false },
        clipId: { type: DataTypes.INTEGER, allowNull: true },
        pairsetId: { type: DataTypes.INTEGER, allowNull: true },
        payload: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        state: { type: DataTypes.STRING(16), allowNull: false },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        leaseOwner: { type: DataTypes.STRING(100), allowNull: true },
        leaseExpiresAt: { type: DataTypes.DATE, allowNull: true },
        stage: { type: DataTypes.STRING(24), allowNull: true },
        progress: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
        error: { type: DataTypes.TEXT, allowNull: true },
        runAfter: { type: DataTypes.DATE, allowNull: false },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        startedAt: { type: DataTypes.DATE, allowNull: true },
        lastWorker: { type: DataTypes.STRING(100), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'jobs' },
    );
  }
}
