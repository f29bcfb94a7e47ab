// What the booking tests share: a club of their own with its members signed in.
import { inject } from 'vitest'
import { api } from '../../support/http'
import { makeClub, makeMember, makeTrainingRecord, type MadeMember, type MemberOverrides } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { BookingMadeDto } from '../../../shared/types/bookings'

export type SignedIn = MadeMember & { cookie: string }

function randomPrefix(): string {
  return Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
}

/** A club of the test's own (Europe/London) with an instructor who issues training records. */
export async function bookingClub(): Promise<{ clubId: string, trainer: MadeMember }> {
  const club = await makeClub({ tagPrefix: randomPrefix() })
  const trainer = await makeMember({ clubId: club.id, roles: ['instructor'] })
  return { clubId: club.id, trainer }
}

/** A member of `clubId`, signed in, current in `courses` (records issued today by `trainerId`). */
export async function member(clubId: string, trainerId: string, courses: string[] = [], o: MemberOverrides = {}): Promise<SignedIn> {
  const m = await makeMember({ clubId, ...o })
  for (const course of courses) await makeTrainingRecord({ memberId: m.memberId, course, trainerId })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

export interface RefusalBody { reasons: { code: string, message: string, course?: { code: string, standing: string } }[] }
export interface ConflictBody { message: string, data: { conflict: { stationId: string, startsAt: string, endsAt: string } | null } }

/** POST /api/bookings as `cookie`. */
export function book(cookie: string, body: Record<string, unknown>) {
  return api<BookingMadeDto & { data: RefusalBody & ConflictBody['data'], message: string }>('/api/bookings', { method: 'POST', as: cookie, body })
}
