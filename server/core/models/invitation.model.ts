import {
  DataTypes,
  Model,
  Op,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
  type WhereOptions,
} from 'sequelize';
import type { InvitationState, InvitationSummary } from '../../../shared/api-types';
import type { Role } from '../../../shared/roles';
import type { User } from './user.model';

/** An admin's offer of an account: one-time link (only its hash is kept), valid until expiresAt. */
export class Invitation extends Model<InferAttributes<Invitation>, InferCreationAttributes<Invitation>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare role: Role;
  declare tokenHash: string;
  declare expiresAt: Date;
  declare acceptedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare invitedById: number | null;
  declare lastSentAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare invitedBy?: NonAttribute<User | null>;

  stateAt(now: Date): InvitationState {
    if (this.acceptedAt) return 'accepted';
    if (this.revokedAt) return 'revoked';
    return this.expiresAt.getTime() <= now.getTime() ? 'expired' : 'pending';
  }

  /** Open invitations (pending or expired) can still be re-sent; only one per address may be open. */
  get isOpen(): NonAttribute<boolean> {
    return !this.acceptedAt && !this.revokedAt;
  }

  static findByTokenHash(tokenHash: string): Promise<Invitation | null> {
    return Invitation.findOne({ where: { tokenHash } });
  }

  static stateCondition(state: InvitationState, now: Date): WhereOptions<Invitation> {
    switch (state) {
      case 'accepted':
        return { acceptedAt: { [Op.ne]: null } };
      case 'revoked':
        return { acceptedAt: null, revokedAt: { [Op.ne]: null } };
      case 'pending':
        return { acceptedAt: null, revokedAt: null, expiresAt: { [Op.gt]: now } };
      case 'expired':
        return { acceptedAt: null, revokedAt: null, expiresAt: { [Op.lte]: now } };
    }
  }

  toApi(now = new Date()): InvitationSummary {
    return {
      id: this.id,
      email: this.email,
      role: this.role,
      state: this.stateAt(now),
      invitedBy: this.invitedBy ? { id: this.invitedBy.id, name: this.invitedBy.name } : null,
      createdAt: this.createdAt.toISOString(),
      lastSentAt: this.lastSentAt.toISOString(),
      expiresAt: this.expiresAt.toISOString(),
      acceptedAt: this.acceptedAt?.toISOString() ?? null,
      revokedAt: this.revokedAt?.toISOString() ?? null,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Invitation.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        email: { type: DataTypes.STRING(320), allowNull: false },
        role: { type: DataTypes.STRING(16), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        acceptedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        invitedById: { type: DataTypes.INTEGER, allowNull: true },
        lastSentAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'invitations' },
    );
  }
}
