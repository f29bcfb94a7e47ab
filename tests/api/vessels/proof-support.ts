// A club of the test's own for the proof-test files: its policy, its vessels and its notices are the
// test's alone, so a policy change or a scan never touches another file's data.
import { randomUUID } from 'node:crypto'
import { inject } from 'vitest'
import { api } from '../../support/http'
import { makeClub, makeMember, makeTier, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { Role } from '../../../shared/utils/permissions'

export type Person = MadeMember & { cookie: string }

/** A member of club `clubId` with `roles`, signed in. */
export async function person(clubId: string, roles: Role[] = []): Promise<Person> {
  const m = await makeMember({ clubId, roles })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

export interface ProofClub {
  clubId: string
  owner: Person
  other: Person
  instructor: Person
  /** An instructor who owns vessels too (for "the owner may not witness"). */
  instructorOwner: Person
  safety: Person
  admin: Person
}

/** A fresh club with an owner, another member, two instructors, a safety officer and an admin, all signed in. */
export async function proofClub(): Promise<ProofClub> {
  const prefix = Array.from({ length: 4 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
  const { id: clubId } = await makeClub({ name: `Proof Club ${randomUUID().slice(0, 6)}`, tagPrefix: prefix })
  const [owner, other, instructor, instructorOwner, safety, admin] = await Promise.all([
    person(clubId), person(clubId), person(clubId, ['instructor']), person(clubId, ['instructor']),
    person(clubId, ['safety_officer']), person(clubId, ['admin']),
  ])
  // A proof-test witness holds a valid T3 or higher.
  await Promise.all([instructor!, instructorOwner!].map(i => makeTier({ memberId: i.memberId, rank: 3 })))
  return { clubId, owner: owner!, other: other!, instructor: instructor!, instructorOwner: instructorOwner!, safety: safety!, admin: admin! }
}

/** POST `body` to `/api/vessels/:id/<what>` as `who`. */
export function act(who: Person, vesselId: string, what: string, body: unknown = {}) {
  return api(`/api/vessels/${vesselId}/${what}`, { method: 'POST', as: who.cookie, body })
}

/** The codes of a 422's reasons. */
export const codes = (body: { data?: { reasons?: { code: string }[] } }) => (body.data?.reasons ?? []).map(r => r.code)
