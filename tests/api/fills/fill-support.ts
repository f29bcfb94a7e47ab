// A club of the test file's own for the fill gate: its waiver, tier table, policy, stations, events and
// people are the file's alone, so a change to one never moves another file's answers.
import { randomUUID } from 'node:crypto'
import { inject } from 'vitest'
import { api } from '../../support/http'
import {
  clubDay, makeClub, makeFillStation, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel, makeWaiver,
  type MemberOverrides, type MadeMember,
} from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { Role } from '../../../shared/utils/permissions'
import type { FillCheckDto } from '../../../shared/types/fills'

export type Person = MadeMember & { cookie: string }

export interface FillClub {
  clubId: string
  /** An instructor holding T3, on the staff of `eventId`. */
  instructor: Person
  /** A launcher rated 75 bar (25 bar to launch at), gauge calibrated 30 days ago; used by `eventId`. */
  stationId: string
  /** Today's event (cap 25 bar), with `stationId` and `instructor` on its staff. */
  eventId: string
}

/** A member of club `clubId` with `roles`, signed in. */
export async function person(clubId: string, roles: Role[] = [], o: MemberOverrides = {}): Promise<Person> {
  const m = await makeMember({ clubId, roles, ...o })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

/** A fresh club with a waiver, a T3 instructor, a fill station and today's event. */
export async function fillClub(): Promise<FillClub> {
  const prefix = Array.from({ length: 4 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
  const { id: clubId } = await makeClub({ name: `Fill Club ${randomUUID().slice(0, 6)}`, tagPrefix: prefix })
  await makeWaiver({ clubId })
  const instructor = await person(clubId, ['instructor'])
  await makeTier({ memberId: instructor.memberId, rank: 3 })
  const { stationId } = await makeFillStation({ clubId })
  const { eventId } = await makeLaunchEvent({ createdBy: instructor.memberId, stationIds: [stationId], staffIds: [instructor.memberId] })
  return { clubId, instructor, stationId, eventId }
}

export interface Filler extends Person { vesselId: string }

export interface FillerOptions extends MemberOverrides {
  /** The member's tier (default 2: 10 bar); null for none. */
  rank?: number | null
  /** Course codes made current (default pressure_safety and rig_operator). */
  courses?: string[]
  /** The vessel's proof pressure (default 15 bar at margin 1.5: rated 10 bar), or null for no proof. */
  proofBar?: number | null
  /** Days since the proof (default 20). */
  proofDaysAgo?: number
  vesselState?: 'awaiting_proof' | 'in_service' | 'quarantined' | 'failed' | 'retired'
  metalInPressurePath?: boolean
  volumeL?: number
  roles?: Role[]
}

/** A member of `club` who may fill their vessel at today's event up to 10 bar, unless the options say otherwise. */
export async function filler(club: FillClub, o: FillerOptions = {}): Promise<Filler> {
  const { rank = 2, courses = ['pressure_safety', 'rig_operator'], proofBar = 15, proofDaysAgo = 20, vesselState = 'in_service', metalInPressurePath, volumeL, roles = [], ...member } = o
  const p = await person(club.clubId, roles, member)
  if (rank !== null) await makeTier({ memberId: p.memberId, rank })
  for (const course of courses) await makeTrainingRecord({ memberId: p.memberId, course, trainerId: club.instructor.memberId, trainedOn: clubDay(-10) })
  const { vesselId } = await makeVessel({ ownerId: p.memberId, state: vesselState, metalInPressurePath, volumeL: volumeL ?? 2 })
  if (proofBar !== null) await makeProofTest({ vesselId, witnessId: club.instructor.memberId, testedOn: clubDay(-proofDaysAgo), pressureBar: proofBar })
  return { ...p, vesselId }
}

export interface FillBody {
  memberId: string
  vesselId: string
  pressure: number
  unit: 'bar' | 'psi' | 'kPa' | 'MPa'
  waterVolumeL: number
  stationId: string
  eventId: string
  supervised?: boolean
}

/** A fill request of `who`'s vessel at the club's event and station (8 bar, 0.5 L water) with `o` over it. */
export function fillBody(club: FillClub, who: Filler, o: Partial<FillBody> = {}): FillBody {
  return { memberId: who.memberId, vesselId: who.vesselId, pressure: 8, unit: 'bar', waterVolumeL: 0.5, stationId: club.stationId, eventId: club.eventId, ...o }
}

/** POST /api/fills/check as `as` (a cookie). */
export function check(as: string, body: FillBody) {
  return api<FillCheckDto & { data?: { fields?: Record<string, string> } }>('/api/fills/check', { method: 'POST', as, body })
}

/** POST /api/fills as `as` (a cookie). */
export function record(as: string, body: FillBody) {
  return api('/api/fills', { method: 'POST', as, body })
}

/** The reason codes of a check's answer or of a refused recording. */
export function codesOf(body: { reasons?: { code: string }[], data?: { reasons?: { code: string }[] } }): string[] {
  return (body.reasons ?? body.data?.reasons ?? []).map(r => r.code)
}

/** Another event of `club` (today, cap 25 bar unless given) using `stationIds` (default the club's station), staffed by the club's instructor. */
export async function otherEvent(club: FillClub, o: { heldOn?: string, pressureCapBar?: number, competition?: boolean, stationIds?: string[], staffIds?: string[], cancelled?: boolean } = {}): Promise<string> {
  const { eventId } = await makeLaunchEvent({
    createdBy: club.instructor.memberId, stationIds: [club.stationId], staffIds: [club.instructor.memberId], ...o,
  })
  return eventId
}
