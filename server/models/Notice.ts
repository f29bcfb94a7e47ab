import { DataTypes, Model, type Sequelize } from 'sequelize'
import type { NoticeStatus } from '#shared/utils/notice-status'

/** One e-mail in the notice queue: unique per member, kind, subject and due date. */
export class Notice extends Model {
  declare id: string
  declare clubId: string
  declare membershipId: string
  declare kind: string
  declare subjectKey: string
  declare dueOn: string
  declare toEmail: string
  declare subject: string
  declare textBody: string
  declare htmlBody: string
  declare status: NoticeStatus
  declare attempts: number
  declare nextAttemptAt: Date
  declare lockedUntil: Date | null
  declare claimId: string | null
  declare deferrals: number
  declare lastError: string | null
  declare sentAt: Date | null
  declare createdAt: Date
  declare updatedAt: Date

  static initModel(sequelize: Sequelize) {
    Notice.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      membershipId: { type: DataTypes.UUID, allowNull: false },
      kind: { type: DataTypes.TEXT, allowNull: false },
      subjectKey: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      dueOn: { type: DataTypes.DATEONLY, allowNull: false },
      toEmail: { type: DataTypes.TEXT, allowNull: false },
      subject: { type: DataTypes.TEXT, allowNull: false },
      textBody: { type: DataTypes.TEXT, allowNull: false },
      htmlBody: { type: DataTypes.TEXT, allowNull: false },
      status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'queued' },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      claimId: { type: DataTypes.UUID },
      deferrals: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      lockedUntil: { type: DataTypes.DATE, allowNull: true },
      lastError: { type: DataTypes.TEXT, allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
    }, { sequelize, modelName: 'notice', tableName: 'notices', underscored: true })
  }
}
