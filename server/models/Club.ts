import { DataTypes, Model, type Sequelize } from 'sequelize'
import type { ClubPolicy } from '../../shared/schemas/club'

/** A club: the tenant every other row belongs to. */
export class Club extends Model {
  declare id: string
  declare name: string
  declare tagPrefix: string
  declare timeZone: string
  declare units: 'bar' | 'psi'
  declare publicUrl: string
  declare graceDays: number
  declare policy: ClubPolicy
  declare createdAt: Date
  declare updatedAt: Date

  static initModel(sequelize: Sequelize) {
    Club.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      name: { type: DataTypes.TEXT, allowNull: false },
      tagPrefix: { type: DataTypes.TEXT, allowNull: false },
      timeZone: { type: DataTypes.TEXT, allowNull: false },
      units: { type: DataTypes.TEXT, allowNull: false },
      publicUrl: { type: DataTypes.TEXT, allowNull: false },
      graceDays: { type: DataTypes.INTEGER, allowNull: false },
      policy: { type: DataTypes.JSONB, allowNull: false },
    }, { sequelize, modelName: 'club', tableName: 'clubs', underscored: true })
  }
}
