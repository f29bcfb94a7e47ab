import { DataTypes, Model, type Sequelize } from 'sequelize'
import { ClubPolicySchema, type ClubPolicy } from '#shared/schemas/club'

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
      policy: {
        type: DataTypes.JSONB,
        allowNull: false,
        // The policy is a validated document: read with its defaults, refused on write when malformed.
        get(this: Club) {
          return ClubPolicySchema.parse(this.getDataValue('policy') ?? {})
        },
        validate: {
          matchesPolicySchema(value: unknown) {
            const result = ClubPolicySchema.safeParse(value)
            if (!result.success) throw new Error(`Club policy: ${result.error.issues.map(i => `${i.path.join('.')} ${i.message}`).join('; ')}`)
          },
        },
      },
    }, { sequelize, modelName: 'club', tableName: 'clubs', underscored: true })
  }
}
