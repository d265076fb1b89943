import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A worker process as it announced itself, with its last heartbeat (migration 0014). */
export class WorkerPresence extends Model<InferAttributes<WorkerPresence>, InferCreationAttributes<WorkerPresence>> {
  declare name: string;
  declare host: string;
  declare pid: number;
  declare version: string;
  declare leaseS: number;
  declare jobsRunning: CreationOptional<number>;
  declare startedAt: Date;
  declare lastBeatAt: Date;
  declare stoppedAt: CreationOptional<Date | null>;

  static initModel(sequelize: Sequelize): void {
    WorkerPresence.init(
      {
        name: { type: DataTypes.STRING(100), primaryKey: true },
        host: { type: DataTypes.STRING(200), allowNull: false },
        pid: { type: DataTypes.INTEGER, allowNull: false },
        version: { type: DataTypes.STRING(32), allowNull: false },
        leaseS: { type: DataTypes.INTEGER, allowNull: false },
        jobsRunning: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        startedAt: { type: DataTypes.DATE, allowNull: false },
        lastBeatAt: { type: DataTypes.DATE, allowNull: false },
        stoppedAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'worker_presences', timestamps: false },
    );
  }
}
