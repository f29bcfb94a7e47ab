import { DataTypes, Model, type Sequelize } from 'sequelize'

export const TOKEN_PURPOSES = ['verify_email', 'reset_password', 'guardian_consent'] as const
export type TokenPurpose = typeof TOKEN_PURPOSES[number]

/** A one-time link token (only its SHA-256 is stored): e-mail verification, password reset, guardian consent. */
export class ActionToken extends Model {
  declare id: string
  declare userId: string
  declare membershipId: string | null
  declare purpose: TokenPurpose
  declare tokenHash: string
  declare expiresAt: Date
  declare usedAt: Date | null
  declare createdAt: Date

  static initModel(sequelize: Sequelize) {
    ActionToken.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      userId: { type: DataTypes.UUID, allowNull: false },
      membershipId: { type: DataTypes.UUID, allowNull: true },
      purpose: { type: DataTypes.TEXT, allowNull: false },
      tokenHash: { type: DataTypes.TEXT, allowNull: false },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      usedAt: { type: DataTypes.DATE, allowNull: true },
    }, { sequelize, modelName: 'actionToken', tableName: 'action_tokens', underscored: true })
  }
}
