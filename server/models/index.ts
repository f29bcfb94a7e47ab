import { Sequelize } from 'sequelize'
import pg from 'pg'
import { Club } from './Club'
import { User } from './User'
import { Membership } from './Membership'
import { Waiver } from './Waiver'
import { WaiverAcceptance } from './WaiverAcceptance'
import { ActionToken } from './ActionToken'
import { Notice } from './Notice'
import { AuditEvent } from './AuditEvent'
import { Session } from './Session'
import { Vessel } from './Vessel'
import { Photo } from './Photo'
import { CouponTest } from './CouponTest'

export { Club, User, Membership, Waiver, WaiverAcceptance, ActionToken, Notice, AuditEvent, Session, Vessel, Photo }
export { CouponTest }

/**
 * Creates a Sequelize instance for `databaseUrl` with every model initialised and associated.
 * `pg` is passed explicitly: the bundler drops dynamically required drivers.
 */
export function createSequelize(databaseUrl: string): Sequelize {
  const sequelize = new Sequelize(databaseUrl, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: false,
    // Fail fast while PostgreSQL is down so /api/health can answer 503 instead of hanging.
    dialectOptions: { connectionTimeoutMillis: 3000 },
    pool: { max: 10, min: 0, acquire: 5000, idle: 10_000, evict: 5000 },
  })
  for (const model of [Club, User, Membership, Waiver, WaiverAcceptance, ActionToken, Notice, AuditEvent, Session, Vessel, Photo]) {
    model.initModel(sequelize)
  }
  CouponTest.initModel(sequelize)
  Membership.belongsTo(User, { foreignKey: 'userId', as: 'user' })
  Membership.belongsTo(Club, { foreignKey: 'clubId', as: 'club' })
  User.hasMany(Membership, { foreignKey: 'userId', as: 'memberships' })
  WaiverAcceptance.belongsTo(Waiver, { foreignKey: 'waiverId', as: 'waiver' })
  Notice.belongsTo(Membership, { foreignKey: 'membershipId', as: 'membership' })
  Vessel.belongsTo(Membership, { foreignKey: 'ownerMembershipId', as: 'owner' })
  return sequelize
}
