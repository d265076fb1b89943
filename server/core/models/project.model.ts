import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { StoredFlagThresholds } from '../../../shared/schemas/project-settings';

/** A group of clips with its own storage quota and processing settings (DESIGN §2). */
export class Project extends Model<InferAttributes<Project>, InferCreationAttributes<Project>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare description: CreationOptional<string>;
  declare archived: CreationOptional<boolean>;
  declare quotaBytes: CreationOptional<number | null>;
  declare estimator: string;
  declare estimatorParams: Record<string, number | string | boolean>;
  declare sampleFps: number;
  declare workingSize: number;
  declare deltas: number[];
  declare flagThresholds: StoredFlagThresholds;
  /** Days after a reject verdict when the clip's files are purged; null keeps rejected footage. */
  declare retentionDays: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Project.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(200), allowNull: false, unique: true },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        quotaBytes: { type: DataTypes.BIGINT, allowNull: true },
        estimator: { type: DataTypes.STRING(32), allowNull: false },
        estimatorParams: { type: DataTypes.JSON, allowNull: false },
        sampleFps: { type: DataTypes.FLOAT, allowNull: false },
        workingSize: { type: DataTypes.INTEGER, allowNull: false },
        deltas: { type: DataTypes.JSON, allowNull: false },
        flagThresholds: { type: DataTypes.JSON, allowNull: false },
        retentionDays: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'projects' },
    );
  }
}
