import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { VerdictDecision } from '../../../shared/review/rules';
import type { ClipVerdict } from '../../../shared/types/review';
import type { User } from './user.model';

/**
 * A curator's accept or reject of a clip (DESIGN §2). A change never edits a row: it sets `supersededAt` on the
 * verdict in force and adds a new one, so the history stays whole; at most one row per clip is in force.
 */
export class Verdict extends Model<InferAttributes<Verdict>, InferCreationAttributes<Verdict>> {
  declare id: CreationOptional<number>;
  declare clipId: number;
  declare curatorId: number;
  declare decision: VerdictDecision;
  declare reason: string | null;
  declare reasonLabel: string | null;
  declare comment: CreationOptional<string>;
  declare bulk: CreationOptional<boolean>;
  declare at: Date;
  declare supersededAt: CreationOptional<Date | null>;
  declare digestId: CreationOptional<number | null>;

  declare curator?: NonAttribute<User>;

  toApi(): ClipVerdict {
    return {
      id: this.id,
      decision: this.decision,
      reason: this.reason,
      reasonLabel: this.reasonLabel,
      comment: this.comment,
      curatorId: this.curatorId,
      curatorName: this.curator?.name ?? '',
      at: this.at.toISOString(),
      supersededAt: this.supersededAt?.toISOString() ?? null,
      bulk: this.bulk,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Verdict.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        clipId: { type: DataTypes.INTEGER, allowNull: false },
        curatorId: { type: DataTypes.INTEGER, allowNull: false },
        decision: { type: DataTypes.STRING(8), allowNull: false },
        reason: { type: DataTypes.STRING(40), allowNull: true },
        reasonLabel: { type: DataTypes.STRING(80), allowNull: true },
        comment: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        bulk: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        at: { type: DataTypes.DATE, allowNull: false },
        supersededAt: { type: DataTypes.DATE, allowNull: true },
        digestId: { type: DataTypes.INTEGER, allowNull: true },
      },
      { sequelize, tableName: 'verdicts', timestamps: false },
    );
  }
}
