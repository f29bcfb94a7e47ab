import { DataTypes, Model, type Sequelize } from 'sequelize'

/** A member's acceptance of one waiver version: the name they typed and when. */
export class WaiverAcceptance extends Model {
  declare id: string
  declare clubId: string
  declare waiverId: string
  declare membershipId: string
  declare typedName: string
  declare acceptedAt: Date

  static initModel(sequelize: Sequelize) {
    WaiverAcceptance.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      waiverId: { type: DataTypes.UUID, allowNull: false },
      membershipId: { type: DataTypes.UUID, allowNull: false },
      typedName: { type: DataTypes.TEXT, allowNull: false },
      acceptedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    }, { sequelize, modelName: 'waiverAcceptance', tableName: 'waiver_acceptances', underscored: true })
  }
}
