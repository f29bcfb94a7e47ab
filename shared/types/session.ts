import type { Role } from '../utils/permissions'

/** The user carried in the sealed session cookie. Roles here shape the interface only; the server re-reads them. */
export interface SessionUser {
  /** Account id. */
  id: string
  /** Membership id: the person's standing in the club. */
  memberId: string
  name: string
  email: string
  clubId: string
  roles: Role[]
}
