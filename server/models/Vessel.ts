import { DataTypes, Model, type Sequelize } from 'sequelize'
import type { VesselConstruction, Weave } from '#shared/utils/vessel-arithmetic'
import type { VesselFibreClass, VesselState } from '#shared/utils/vessel-states'
import type { Membership } from './Membership'

/**
 * A member's pressure vessel in the club's registry, known by its club tag. Decimal columns come back
 * from PostgreSQL as strings (exact numerics); the DTO turns them into numbers.
 */
export class Vessel extends Model {
  declare id: string
  declare clubId: string
  declare ownerMembershipId: string
  declare number: number
  declare tag: string
  declare name: string
  declare construction: VesselConstruction
  declare volumeL: string
  declare diameterMm: string
  declare lengthMm: string | null
  declare emptyMassG: string | null
  declare metalInPressurePath: boolean
  declare fibreClass: VesselFibreClass | null
  declare arealWeightGPerM2: string | null
  declare weave: Weave | null
  declare plies: number | null
  declare resin: string | null
  declare state: VesselState
  declare lastLayupOn: string | null
  /** When the owner asked for a proof test; cleared when one is recorded. */
  declare proofRequestedAt: Date | null
  declare createdAt: Date
  declare updatedAt: Date
  declare owner?: Membership

  static initModel(sequelize: Sequelize) {
    Vessel.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      ownerMembershipId: { type: DataTypes.UUID, allowNull: false },
      number: { type: DataTypes.INTEGER, allowNull: false },
      tag: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      construction: { type: DataTypes.TEXT, allowNull: false },
      volumeL: { type: DataTypes.DECIMAL(8, 3), allowNull: false, field: 'volume_l' },
      diameterMm: { type: DataTypes.DECIMAL(7, 2), allowNull: false },
      lengthMm: { type: DataTypes.DECIMAL(7, 1), allowNull: true },
      emptyMassG: { type: DataTypes.DECIMAL(8, 1), allowNull: true },
      metalInPressurePath: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      fibreClass: { type: DataTypes.TEXT, allowNull: true },
      arealWeightGPerM2: { type: DataTypes.DECIMAL(7, 1), allowNull: true, field: 'areal_weight_g_per_m2' },
      weave: { type: DataTypes.TEXT, allowNull: true },
      plies: { type: DataTypes.INTEGER, allowNull: true },
      resin: { type: DataTypes.TEXT, allowNull: true },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'awaiting_proof' },
      lastLayupOn: { type: DataTypes.DATEONLY, allowNull: true },
      proofRequestedAt: { type: DataTypes.DATE, allowNull: true },
    }, { sequelize, modelName: 'vessel', tableName: 'vessels', underscored: true })
  }
}
