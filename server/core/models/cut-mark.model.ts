import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { CutMarkValue } from '../../../shared/types/cuts';

/** A curator's correction of the cut detector before one frame of a clip (DESIGN §2 cut). */
export class CutMark extends Model<InferAttributes<CutMark>, InferCreationAttributes<CutMark>> {
  declare id: CreationOptional<number>;
  declare clipId: number;
  declare frameIndex: number;
  declare value: CutMarkValue;
  declare userId: number;
  declare markedAt: Date;

  static initModel(sequelize: Sequelize): void {
    CutMark.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        clipId: { type: DataTypes.INTEGER, allowNull: false },
        frameIndex: { type: DataTypes.INTEGER, allowNull: false },
        value: { type: DataTypes.STRING(8), allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        markedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'cut_marks', timestamps: false },
    );
  }
}
