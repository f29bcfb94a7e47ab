import { DataTypes, Model, type Sequelize } from 'sequelize'

/** What a photo shows: a build stage of a vessel, the gauge at a proof test, a burst coupon, or an incident. */
export type PhotoPurpose = 'build' | 'gauge' | 'coupon' | 'incident'

/**
 * A stored photo: the row says whose it is and what was stored; the bytes live in the uploads
 * folder named by `id` (see server/services/photos/), never under the web root.
 */
export class Photo extends Model {
  declare id: string
  declare clubId: string
  declare vesselId: string | null
  declare incidentId: string | null
  declare uploadedByMembershipId: string
  declare purpose: PhotoPurpose
  declare contentType: 'image/jpeg' | 'image/png' | 'image/webp'
  declare byteSize: number
  declare width: number
  declare height: number
  declare caption: string | null
  declare createdAt: Date

  static initModel(sequelize: Sequelize) {
    Photo.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      vesselId: { type: DataTypes.UUID, allowNull: true },
      incidentId: { type: DataTypes.UUID, allowNull: true },
      uploadedByMembershipId: { type: DataTypes.UUID, allowNull: false },
      purpose: { type: DataTypes.TEXT, allowNull: false },
      contentType: { type: DataTypes.TEXT, allowNull: false },
      byteSize: { type: DataTypes.INTEGER, allowNull: false },
      width: { type: DataTypes.INTEGER, allowNull: false },
      height: { type: DataTypes.INTEGER, allowNull: false },
      caption: { type: DataTypes.TEXT, allowNull: true },
    }, { sequelize, modelName: 'photo', tableName: 'photos', underscored: true, updatedAt: false })
  }
}
