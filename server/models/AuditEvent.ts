import { DataTypes, Model, type Sequelize } from 'sequelize'

/** One privileged change: who, what, when, before, after, why. The table refuses UPDATE and DELETE. */
export class AuditEvent extends Model {
  declare id: string
  declare clubId: string
  declare actorMembershipId: string | null
  /** Only on rows without an actor id (a fixed label), and on rows written before actors were kept by id. */
  declare actorName: string | null
  declare action: string
  declare subjectType: string
  declare subjectId: string | null
  declare before: Record<string, unknown> | null
  declare after: Record<string, unknown> | null
  declare reason: string | null
  declare createdAt: Date

  static initModel(sequelize: Sequelize) {
    AuditEvent.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      clubId: { type: DataTypes.UUID, allowNull: false },
      actorMembershipId: { type: DataTypes.UUID, allowNull: true },
      actorName: { type: DataTypes.TEXT, allowNull: true },
      action: { type: DataTypes.TEXT, allowNull: false },
      subjectType: { type: DataTypes.TEXT, allowNull: false },
      subjectId: { type: DataTypes.UUID, allowNull: true },
      before: { type: DataTypes.JSONB, allowNull: true },
      after: { type: DataTypes.JSONB, allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: true },
    }, { sequelize, modelName: 'auditEvent', tableName: 'audit_events', underscored: true, updatedAt: false })
  }
}
