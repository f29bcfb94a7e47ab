import { DataTypes, Model, type Sequelize } from 'sequelize'

/** An account: one per person, across clubs. Never returned from a route (it holds the hash). */
export class User extends Model {
  declare id: string
  declare email: string
  declare name: string
  /** Null for an imported account until its member sets a password from the welcome link: it cannot sign in. */
  declare passwordHash: string | null
  declare emailVerifiedAt: Date | null
  declare createdAt: Date
  declare updatedAt: Date

  static initModel(sequelize: Sequelize) {
    User.init({
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      email: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      passwordHash: { type: DataTypes.TEXT, allowNull: true },
      emailVerifiedAt: { type: DataTypes.DATE, allowNull: true },
    }, { sequelize, modelName: 'user', tableName: 'users', underscored: true })
  }
}
