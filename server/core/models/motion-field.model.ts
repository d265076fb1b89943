import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { FrameMotion } from '../../../shared/types/frames';

/** Forward: from frame t to t + 1; backward: from t + 1 back to t. fromIndex and toIndex say which way too. */
export type MotionDirection = 'forward' | 'backward';

/**
 * One dense motion field of a clip (DESIGN §2), written by the worker's Motion stage. The field itself is a `.flo`
 * file (storage/paths.ts); the row keeps what produced it and its summary figures (px per sampled-frame step at the
 * working size). fromIndex and toIndex are always neighbours that no cut separates.
 */
export class MotionField extends Model<InferAttributes<MotionField>, InferCreationAttributes<MotionField>> {
  declare id: CreationOptional<number>;
  declare clipId: number;
  declare fromIndex: number;
  declare toIndex: number;
  declare direction: MotionDirection;
  declare estimator: string;
  /** Every parameter the estimator ran with: its defaults merged with the project's overrides. */
  declare params: Record<string, number | string | boolean>;
  declare meanMagnitude: number;
  /** Nearest-rank 95th percentile of the magnitude over every known pixel. */
  declare p95Magnitude: number;
  /** The same over consistent pixels only; null on fields stored before migration 0010. Sets the colour scale. */
  declare consistentP95Magnitude: CreationOptional<number | null>;
  /** Share of pixels that pass the forward–backward check. */
  declare consistentShare: number;
  /** The median vector: the global motion, robust to moving objects (the shaky flag reads it). */
  declare medianU: number;
  declare medianV: number;
  /** The largest known magnitude. */
  declare maxMagnitude: number;

  toFrameMotion(): FrameMotion {
    const { meanMagnitude, p95Magnitude, consistentShare } = this;
    return { meanMagnitude, p95Magnitude, consistentShare };
  }

  /** The clip's forward fields in frame order. */
  static forwardOfClip(clipId: number): Promise<MotionField[]> {
    return MotionField.findAll({ where: { clipId, direction: 'forward' }, order: [['fromIndex', 'ASC']] });
  }

  static initModel(sequelize: Sequelize): void {
    MotionField.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        clipId: { type: DataTypes.INTEGER, allowNull: false },
        fromIndex: { type: DataTypes.INTEGER, allowNull: false },
        toIndex: { type: DataTypes.INTEGER, allowNull: false },
        direction: { type: DataTypes.STRING(8), allowNull: false },
        estimator: { type: DataTypes.STRING(32), allowNull: false },
        params: { type: DataTypes.JSON, allowNull: false },
        meanMagnitude: { type: DataTypes.FLOAT, allowNull: false },
        p95Magnitude: { type: DataTypes.FLOAT, allowNull: false },
        consistentP95Magnitude: { type: DataTypes.FLOAT, allowNull: true },
        consistentShare: { type: DataTypes.FLOAT, allowNull: false },
        medianU: { type: DataTypes.FLOAT, allowNull: false },
        medianV: { type: DataTypes.FLOAT, allowNull: false },
        maxMagnitude: { type: DataTypes.FLOAT, allowNull: false },
      },
      { sequelize, tableName: 'motion_fields', timestamps: false },
    );
  }
}
