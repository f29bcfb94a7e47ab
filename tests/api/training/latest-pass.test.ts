import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeClub, makeMember, makeTrainingRecord, type MadeMember } from '../../support/factories'
import { signInFromOwnAddress } from './sign-in'
import type { DeskPageDto } from '../../../shared/types/audit-desk'

// The stored latest pass per member and course (training_latest_passes, kept by a trigger on the
// records) must always be what the "latest" order picks from the records themselves: passed,
// confirmed, by training day, then entry, then id. Each step below writes records the way the app
// or an import does and compares the two for every member and course of the test's club (the stored
// row also carries the member's account, which a foreign key holds to the membership's).

interface Latest { membership_id: string, course_id: string, record_id: string, expires_on: string, retraining: boolean, user_id: string }

let clubId = ''
let instructor: MadeMember & { cookie: string }
let safety: MadeMember & { cookie: string }
let member: MadeMember
let other: MadeMember

/** The stored rows of the club. */
const stored = () => sql<Latest>(`SELECT membership_id, course_id, record_id, expires_on::text, retraining, user_id FROM training_latest_passes
  WHERE club_id = $1 ORDER BY membership_id, course_id`, [clubId])

/** The same answer from the records, in the order the training pages decide "latest". */
const ordered = () => sql<Latest>(`SELECT DISTINCT ON (r.membership_id, r.course_id) r.membership_id, r.course_id, r.id AS record_id, r.expires_on::text,
    r.retraining_required_at IS NOT NULL AS retraining, m.user_id
  FROM training_records r JOIN memberships m ON m.id = r.membership_id
  WHERE r.club_id = $1 AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
  ORDER BY r.membership_id, r.course_id, r.trained_to DESC, r.created_at DESC, r.id DESC`, [clubId])

/** Checks the two agree and returns the stored record of `memberId` for `course` (its code), or undefined. */
async function agreed(memberId: string, course: string): Promise<Latest | undefined> {
  const rows = await stored()
  expect(rows).toEqual(await ordered())
  const [c] = await sql<{ id: string }>('SELECT id FROM courses WHERE club_id = $1 AND code = $2', [clubId, course])
  return rows.find(r => r.membership_id === memberId && r.course_id === c!.id)
}

/** The record ids the audit desk's training table lists for the club. */
async function deskIds(): Promise<string[]> {
  const res = await api<DeskPageDto>('/api/audit/desk/training-expiring?within=90&pageSize=100', { as: safety.cookie })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body.items.map(i => i.id).sort()
}

beforeAll(async () => {
  clubId = (await makeClub()).id
  const i = await makeMember({ clubId, roles: ['instructor'] })
  const s = await makeMember({ clubId, roles: ['instructor', 'safety_officer'] })
  instructor = { ...i, cookie: await signInFromOwnAddress(i.email, i.password) }
  safety = { ...s, cookie: await signInFromOwnAddress(s.email, s.password) }
  member = await makeMember({ clubId })
  other = await makeMember({ clubId })
})

describe('the stored latest pass per member and course', () => {
  it('follows inserts, a later record, an import and its confirmation, the retraining flag and a deletion', async () => {
    const by = instructor.memberId
    // Inserts: a pass, a fail after it (no pass: no change), and the other member's records.
    const first = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-200), expiresOn: clubDay(40) })
    await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-100), result: 'fail', expiresOn: clubDay(50) })
    await makeTrainingRecord({ memberId: other.memberId, course: 'rig_operator', trainerId: by, trainedOn: clubDay(-20), expiresOn: clubDay(30) })
    await makeTrainingRecord({ memberId: other.memberId, course: 'respirator_fit', trainerId: by, trainedOn: clubDay(-20), expiresOn: clubDay(20) })
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(first.recordId)
    expect(await deskIds()).toContain(first.recordId)

    // A later record supersedes it; one of the same training day entered after that supersedes that one.
    const later = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-50), expiresOn: clubDay(60) })
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(later.recordId)
    const sameDay = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-50), expiresOn: clubDay(70) })
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(sameDay.recordId)
    expect(await deskIds()).not.toContain(first.recordId)

    // An unconfirmed import, though trained later, stays out until an instructor confirms it.
    const imported = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-10), expiresOn: clubDay(80), imported: true })
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(sameDay.recordId)
    const confirmed = await api(`/api/training/imported/${imported.recordId}/confirm`, { as: instructor.cookie, body: { confirm: true } })
    expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(200)
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(imported.recordId)
    expect(await deskIds()).toContain(imported.recordId)

    // An import rejected (deleted while unconfirmed) never counted: nothing moves.
    const rejected = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: by, trainedOn: clubDay(-1), imported: true })
    expect((await api(`/api/training/imported/${rejected.recordId}/reject`, { as: instructor.cookie, body: { reason: 'Not ours' } })).status).toBe(200)
    expect((await agreed(member.memberId, 'pressure_safety'))?.record_id).toBe(imported.recordId)

    // The retraining flag is copied: the record stays the latest, the desk no longer lists it.
    const flagged = await api(`/api/training/records/${imported.recordId}/retraining`, { as: safety.cookie, body: { reason: 'changed_ppe' } })
    expect(flagged.status, JSON.stringify(flagged.body)).toBe(200)
    expect(await agreed(member.memberId, 'pressure_safety')).toMatchObject({ record_id: imported.recordId, retraining: true })
    expect(await deskIds()).not.toContain(imported.recordId)

    // A changed expiry is copied.
    await sql('UPDATE training_records SET expires_on = $2 WHERE id = $1', [sameDay.recordId, clubDay(75)])
    await sql('UPDATE training_records SET expires_on = $2 WHERE id = $1', [imported.recordId, clubDay(85)])
    expect((await agreed(member.memberId, 'pressure_safety'))?.expires_on).toBe(clubDay(85))

    // The latest record deleted: the one before it is the latest again; all deleted: no row.
    await sql('DELETE FROM training_records WHERE id = $1', [imported.recordId])
    expect(await agreed(member.memberId, 'pressure_safety')).toMatchObject({ record_id: sameDay.recordId, expires_on: clubDay(75), retraining: false })
    expect(await deskIds()).toContain(sameDay.recordId)
    await sql(`DELETE FROM training_records WHERE membership_id = $1 AND course_id = (SELECT id FROM courses WHERE club_id = $2 AND code = 'pressure_safety')`,
      [member.memberId, clubId])
    expect(await agreed(member.memberId, 'pressure_safety')).toBeUndefined()
    // The other member's rows were never touched.
    expect((await stored()).filter(r => r.membership_id === other.memberId)).toHaveLength(2)
  })

  it('refuses a stored row that names another account than its membership\'s', async () => {
    const [row] = (await stored()).filter(r => r.membership_id === other.memberId)
    const [otherUser] = await sql<{ user_id: string }>('SELECT user_id FROM memberships WHERE id = $1', [member.memberId])
    await expect(sql('UPDATE training_latest_passes SET user_id = $3 WHERE membership_id = $1 AND course_id = $2',
      [row!.membership_id, row!.course_id, otherUser!.user_id])).rejects.toThrow(/training_latest_passes_membership_user_fkey/)
    expect((await stored()).find(r => r.record_id === row!.record_id)).toEqual(row)
  })
})
