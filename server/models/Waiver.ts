import { DataTypes, Model, type Sequelize } from 'sequelize'

/** One published version of the club's risk waiver text. Versions are never edited. */
export class Waiver extends Model {
  declare id: string
  declare clubId: string
  declare version: number
  declare title: string
  declare body: string
  declare publishedAt: Date
  declare publishedBy: string | null

  static initModel(sequelize: Sequelize) {
    Waiver.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      title: { type: DataTypes.TEXT, allowNull: false },
      body: { type: DataTypes.TEXT, allowNull: false },
      publishedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      publishedBy: { type: DataTypes.UUID, allowNull: true },
    }, { sequelize, modelName: 'waiver', tableName: 'waivers', underscored: true })
  }
}
