// A club of the test's own for the tier files: its tier table, members, fills and notices are the
// test's alone, so an edit of the table or a notice scan never touches another file's data.
import { randomUUID } from 'node:crypto'
import { inject } from 'vitest'
import { api } from '../../support/http'
import { makeClub, makeFill, makeFillStation, makeLaunchEvent, makeMember, makeTier, makeTrainingRecord, makeVessel, type MadeMember, type MemberOverrides } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { Role } from '../../../shared/utils/permissions'

export type Person = MadeMember & { cookie: string }

export interface TierClub {
  clubId: string
  /** An instructor holding a valid T3. */
  instructor: Person
  /** A safety officer (and instructor) holding a valid T4. */
  safety: Person
  admin: Person
  /** Where test fills happen: an event today at a station of the club. */
  eventId: string
  stationId: string
}

/** A member of club `clubId` with `roles`, signed in. */
export async function person(clubId: string, roles: Role[] = [], o: MemberOverrides = {}): Promise<Person> {
  const m = await makeMember({ clubId, roles, ...o })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

/** A fresh club with a T3 instructor, a T4 safety officer, an admin, and an event today to log fills at. */
export async function tierClub(): Promise<TierClub> {
  const prefix = Array.from({ length: 4 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
  const { id: clubId } = await makeClub({ name: `Tier Club ${randomUUID().slice(0, 6)}`, tagPrefix: prefix })
  const [instructor, safety, admin] = await Promise.all([person(clubId, ['instructor']), person(clubId, ['instructor', 'safety_officer']), person(clubId, ['admin'])])
  await makeTier({ memberId: instructor!.memberId, rank: 3 })
  await makeTier({ memberId: safety!.memberId, rank: 4, initial: true })
  const { stationId } = await makeFillStation({ clubId })
  const { eventId } = await makeLaunchEvent({ createdBy: safety!.memberId, stationIds: [stationId], staffIds: [instructor!.memberId] })
  return { clubId, instructor: instructor!, safety: safety!, admin: admin!, eventId, stationId }
}

/** `n` allowed fills of `member` today (supervised by `supervisorId` when given), at `pressureBar`. */
export async function logFills(c: TierClub, member: MadeMember, n: number, o: { supervisorId?: string, pressureBar?: number } = {}) {
  const { vesselId } = await makeVessel({ ownerId: member.memberId, state: 'in_service' })
  for (let i = 0; i < n; i++) await makeFill({ eventId: c.eventId, stationId: c.stationId, memberId: member.memberId, vesselId, ...o })
}

/** A current training record of `course` for `member`, signed by `trainerId`. */
export const trained = (member: MadeMember, course: string, trainerId: string) => makeTrainingRecord({ memberId: member.memberId, course, trainerId })

/** POST `body` to `/api/members/:id/tiers<path>` as `who`. */
export function tierPost(who: Person, memberId: string, path: string, body: unknown = {}) {
  return api(`/api/members/${memberId}/tiers${path}`, { method: 'POST', as: who.cookie, body })
}

/** The codes of a 422's reasons. */
export const codes = (body: { data?: { reasons?: { code: string }[] } }) => (body.data?.reasons ?? []).map(r => r.code)
