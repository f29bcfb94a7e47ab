import { DataTypes, Model, type Sequelize } from 'sequelize'

/** Why a session was ended before its time (the `revoke_reason` check constraint lists the same). */
export type SessionRevokeReason = 'signed_out' | 'signed_out_elsewhere' | 'password_reset' | 'suspended' | 'resigned'

/**
 * One signed-in browser of an account: the sealed cookie carries only its id. Ended by sign-out
 * (`revokedAt`), or by the lifetimes counted from `createdAt` and `lastSeenAt` (see server/services/accounts/sessions.ts).
 */
export class Session extends Model {
  declare id: string
  declare userId: string
  declare membershipId: string
  declare createdAt: Date
  declare lastSeenAt: Date
  declare address: string
  declare userAgent: string | null
  declare revokedAt: Date | null
  declare revokeReason: SessionRevokeReason | null

  static initModel(sequelize: Sequelize) {
    Session.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      userId: { type: DataTypes.UUID, allowNull: false },
      membershipId: { type: DataTypes.UUID, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
      lastSeenAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      address: { type: DataTypes.TEXT, allowNull: false },
      userAgent: { type: DataTypes.TEXT, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      revokeReason: { type: DataTypes.TEXT, allowNull: true },
    }, { sequelize, modelName: 'session', tableName: 'sessions', underscored: true, updatedAt: false })
  }
}
