import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** Bytes held for an upload in flight, so concurrent uploads cannot pass a quota together. */
export class UploadReservation extends Model<
  InferAttributes<UploadReservation>,
  InferCreationAttributes<UploadReservation>
> {
  declare id: string;
  declare projectId: number;
  declare userId: number;
  declare bytes: number;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    UploadReservation.init(
      {
        id: { type: DataTypes.STRING(36), primaryKey: true },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        bytes: { type: DataTypes.BIGINT, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'upload_reservations', updatedAt: false },
    );
  }
}
