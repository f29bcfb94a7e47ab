import { DataTypes, Model, type Sequelize } from 'sequelize'
import type { Role } from '#shared/utils/permissions'
import type { User } from './User'
import type { Club } from './Club'

/** A person's standing in one club: roles, dues, admin actions, junior and contact details. */
export class Membership extends Model {
  declare id: string
  declare clubId: string
  declare userId: string
  declare roles: Role[]
  declare approvedAt: Date | null
  declare paidThrough: string | null
  declare suspendedAt: Date | null
  declare suspendedReason: string | null
  declare resignedAt: Date | null
  declare birthDate: string | null
  declare guardianName: string | null
  declare guardianEmail: string | null
  declare guardianConsentAt: Date | null
  declare phone: string | null
  declare emergencyContactName: string | null
  declare emergencyContactPhone: string | null
  declare unitPreference: 'bar' | 'psi'
  declare noticeOptOuts: string[]
  /** The dues plan the member renews on (null: chosen at the first payment). */
  declare duesPlanId: string | null
  declare createdAt: Date
  declare updatedAt: Date
  declare user?: User
  declare club?: Club

  static initModel(sequelize: Sequelize) {
    Membership.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      userId: { type: DataTypes.UUID, allowNull: false },
      roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: ['member'] },
      approvedAt: { type: DataTypes.DATE, allowNull: true },
      paidThrough: { type: DataTypes.DATEONLY, allowNull: true },
      suspendedAt: { type: DataTypes.DATE, allowNull: true },
      suspendedReason: { type: DataTypes.TEXT, allowNull: true },
      resignedAt: { type: DataTypes.DATE, allowNull: true },
      birthDate: { type: DataTypes.DATEONLY, allowNull: true },
      guardianName: { type: DataTypes.TEXT, allowNull: true },
      guardianEmail: { type: DataTypes.TEXT, allowNull: true },
      guardianConsentAt: { type: DataTypes.DATE, allowNull: true },
      phone: { type: DataTypes.TEXT, allowNull: true },
      emergencyContactName: { type: DataTypes.TEXT, allowNull: true },
      emergencyContactPhone: { type: DataTypes.TEXT, allowNull: true },
      unitPreference: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'bar' },
      noticeOptOuts: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
      duesPlanId: { type: DataTypes.UUID, allowNull: true },
    }, { sequelize, modelName: 'membership', tableName: 'memberships', underscored: true })
  }
}
