import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { UsageByKind } from '../../../shared/types/admin';

/** Bytes on disk by kind on one day (UTC), as the reconcile-usage job measured them; feeds the 30-day trend. */
export class UsageSnapshot extends Model<InferAttributes<UsageSnapshot>, InferCreationAttributes<UsageSnapshot>> {
  declare id: CreationOptional<number>;
  declare day: string;
  declare totalBytes: number;
  declare byKind: UsageByKind;
  /** What the last reconciliation found and fixed. */
  declare drift: Record<string, unknown>;
  declare takenAt: Date;

  static initModel(sequelize: Sequelize): void {
    UsageSnapshot.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        day: { type: DataTypes.STRING(10), allowNull: false, unique: true },
        totalBytes: { type: DataTypes.BIGINT, allowNull: false },
        byKind: { type: DataTypes.JSON, allowNull: false },
        drift: { type: DataTypes.JSON, allowNull: false },
        takenAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'usage_snapshots', timestamps: false },
    );
  }
}
