import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** One rejection digest mailed to an uploader; the latest one's time sets when the next may go. */
export class RejectionDigest extends Model<InferAttributes<RejectionDigest>, InferCreationAttributes<RejectionDigest>> {
  declare id: CreationOptional<number>;
  declare uploaderId: number;
  declare at: Date;
  declare clipCount: number;

  static initModel(sequelize: Sequelize): void {
    RejectionDigest.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        uploaderId: { type: DataTypes.INTEGER, allowNull: false },
        at: { type: DataTypes.DATE, allowNull: false },
        clipCount: { type: DataTypes.INTEGER, allowNull: false },
      },
      { sequelize, tableName: 'rejection_digests', timestamps: false },
    );
  }
}
