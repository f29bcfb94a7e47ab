import { DataTypes, Model, type Sequelize } from 'sequelize'
import type { FibreClass, Weave } from '#shared/utils/vessel-arithmetic'
import type { CouponFailureMode } from '#shared/utils/coupon-failure-modes'

/**
 * A burst coupon: a short tube laid up like a vessel and burst on purpose. Decimal columns come back
 * from PostgreSQL as strings; the DTO turns them into numbers.
 */
export class CouponTest extends Model {
  declare id: string
  declare clubId: string
  declare testedByMembershipId: string
  declare testedOn: string
  declare fibreClass: FibreClass
  declare arealWeightGPerM2: string
  declare weave: Weave
  declare plies: number
  declare resin: string
  declare resinKey: string
  declare tubeDiameterMm: string
  declare fibreVolumeFraction: string
  declare burstPressureBar: string
  declare failureMode: CouponFailureMode
  declare notes: string | null
  declare photoId: string | null
  declare createdAt: Date

  static initModel(sequelize: Sequelize) {
    CouponTest.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      testedByMembershipId: { type: DataTypes.UUID, allowNull: false },
      testedOn: { type: DataTypes.DATEONLY, allowNull: false },
      fibreClass: { type: DataTypes.TEXT, allowNull: false },
      arealWeightGPerM2: { type: DataTypes.DECIMAL(7, 1), allowNull: false, field: 'areal_weight_g_per_m2' },
      weave: { type: DataTypes.TEXT, allowNull: false },
      plies: { type: DataTypes.INTEGER, allowNull: false },
      resin: { type: DataTypes.TEXT, allowNull: false },
      resinKey: { type: DataTypes.TEXT, allowNull: false },
      tubeDiameterMm: { type: DataTypes.DECIMAL(7, 2), allowNull: false },
      fibreVolumeFraction: { type: DataTypes.DECIMAL(4, 3), allowNull: false },
      burstPressureBar: { type: DataTypes.DECIMAL(8, 2), allowNull: false },
      failureMode: { type: DataTypes.TEXT, allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      photoId: { type: DataTypes.UUID, allowNull: true },
    }, { sequelize, modelName: 'couponTest', tableName: 'coupon_tests', underscored: true, updatedAt: false })
  }
}
