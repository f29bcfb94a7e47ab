import { describe, it, expect, beforeAll } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeFill } from '../../support/factories'
import type { Paged } from '../../../shared/types/common'
import type { VesselDto, VesselListItemDto } from '../../../shared/types/vessels'
import { check, codesOf, fillBody, fillClub, filler, otherEvent, person, record, type FillClub, type Filler } from './fill-support'

/** POST /api/fills: the gate again under the vessel's lock; allowed fills and refused attempts both logged. */
let club: FillClub

beforeAll(async () => {
  club = await fillClub()
})

interface FillRow { allowed: boolean, reasons: { code: string }[], recorded_by_membership_id: string, supervisor_membership_id: string | null, pressure_bar: number, entered_unit: string, permitted_max_bar: number, limiting_factor: string }
const rowsOf = (vesselId: string) => sql<FillRow>('SELECT * FROM fills WHERE vessel_id = $1 ORDER BY created_at', [vesselId])

/** `n` allowed fills of `who`'s vessel at the club's event, straight into the log. */
async function logged(who: Filler, n: number) {
  for (let i = 0; i < n; i++) await makeFill({ eventId: club.eventId, stationId: club.stationId, memberId: who.memberId, vesselId: who.vesselId })
}

describe('recording a fill', () => {
  it('an allowed fill: 201 with its id and the decision, one row logged as allowed by the member', async () => {
    const m = await filler(club)
    const res = await record(m.cookie, fillBody(club, m, { pressure: 116, unit: 'psi' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ allowed: true, reasons: [], permittedMaxBar: 10, limitingFactor: 'TIER', id: expect.any(String), recordedAt: expect.any(String) })
    const rows = await rowsOf(m.vesselId)
    expect(rows).toEqual([expect.objectContaining({ allowed: true, reasons: [], recorded_by_membership_id: m.memberId, supervisor_membership_id: null, entered_unit: 'psi' })])
    expect(rows[0]!.pressure_bar).toBeCloseTo(res.body.requested.pressureBar, 12)
  })

  it('every refusal is logged as a refused attempt with its reasons, and answers 422 with them; a check logs nothing', async () => {
    const m = await filler(club)
    expect((await check(m.cookie, fillBody(club, m, { pressure: 12 }))).body.allowed).toBe(false)
    expect(await rowsOf(m.vesselId)).toEqual([])
    const res = await record(m.cookie, fillBody(club, m, { pressure: 12 }))
    expect(res.status).toBe(422)
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'])
    expect(res.body.data).toMatchObject({ allowed: false, permittedMaxBar: 10, limitingFactor: 'TIER' })
    const supervisedOwn = await record(m.cookie, fillBody(club, m, { supervised: true }))
    expect(codesOf(supervisedOwn.body)).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
    const rows = await rowsOf(m.vesselId)
    expect(rows.map(r => [r.allowed, r.reasons.map(x => x.code)])).toEqual([
      [false, ['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED']],
      [false, ['SUPERVISOR_NOT_QUALIFIED']],
    ])
    expect(rows[1]!.supervisor_membership_id).toBeNull()
  })

  it('a supervised fill stores the instructor as its supervisor and recorder', async () => {
    const m = await filler(club, { rank: 1 })
    const res = await record(club.instructor.cookie, fillBody(club, m, { supervised: true }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(await rowsOf(m.vesselId)).toEqual([expect.objectContaining({ allowed: true, supervisor_membership_id: club.instructor.memberId, recorded_by_membership_id: club.instructor.memberId })])
  })

  it('staff record for a member without supervision; the recorder is the staff member', async () => {
    const m = await filler(club)
    expect((await record(club.instructor.cookie, fillBody(club, m))).status).toBe(201)
    expect(await rowsOf(m.vesselId)).toEqual([expect.objectContaining({ recorded_by_membership_id: club.instructor.memberId, supervisor_membership_id: null })])
  })

  it('an event that is not today: the check of a future event is allowed, recording it is refused EVENT_NOT_TODAY (and logged)', async () => {
    const m = await filler(club)
    const future = await otherEvent(club, { heldOn: clubDay(3) })
    expect((await check(m.cookie, fillBody(club, m, { eventId: future }))).body.allowed).toBe(true)
    const res = await record(m.cookie, fillBody(club, m, { eventId: future }))
    expect(res.status).toBe(422)
    expect(codesOf(res.body)).toEqual(['EVENT_NOT_TODAY'])
    expect((await rowsOf(m.vesselId)).map(r => r.allowed)).toEqual([false])
  })

  it('bad input writes nothing: pressure 0 and water at the volume (400), another\'s vessel (404), another member as a plain member (403)', async () => {
    const m = await filler(club)
    const other = await filler(club)
    expect((await record(m.cookie, fillBody(club, m, { pressure: 0 }))).status).toBe(400)
    expect((await record(m.cookie, fillBody(club, m, { waterVolumeL: 2 }))).status).toBe(400)
    expect((await record(m.cookie, fillBody(club, m, { vesselId: other.vesselId }))).status).toBe(404)
    expect((await record(m.cookie, fillBody(club, other))).status).toBe(403)
    expect((await record(m.cookie, fillBody(club, m, { eventId: await otherEvent(club, { cancelled: true }) }))).status).toBe(409)
    expect(await rowsOf(m.vesselId)).toEqual([])
    expect(await rowsOf(other.vesselId)).toEqual([])
  })
})

describe('lapse by fill count', () => {
  it('the fill that reaches the limit (10 for a bottle) is allowed, the next is refused PROOF_LAPSED; the vessel is then retest due and in the lapsing filter', async () => {
    const m = await filler(club)
    const safety = await person(club.clubId, ['safety_officer'])
    await logged(m, 8)
    const lapsing = async () => (await api<Paged<VesselListItemDto>>('/api/vessels', { as: safety.cookie, query: { lapsing: '1', pageSize: 100 } })).body.items.map(v => v.id)
    expect(await lapsing()).not.toContain(m.vesselId)
    expect((await record(m.cookie, fillBody(club, m))).status).toBe(201) // the 9th
    const tenth = await record(m.cookie, fillBody(club, m))
    expect(tenth.status, JSON.stringify(tenth.body)).toBe(201)
    const eleventh = await record(m.cookie, fillBody(club, m))
    expect(eleventh.status).toBe(422)
    expect(codesOf(eleventh.body)).toEqual(['PROOF_LAPSED'])
    expect(eleventh.body.data).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'VESSEL_RATING' })
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual(['PROOF_LAPSED'])
    expect((await api<VesselDto>(`/api/vessels/${m.vesselId}`, { as: m.cookie })).body).toMatchObject({ effectiveState: 'retest_due', ratedFillBar: null })
    // The officers' "proof lapsing in 30 days" filter counts fills too (the proof itself is only 20 days old).
    expect(await lapsing()).toContain(m.vesselId)
    const rows = await rowsOf(m.vesselId)
    expect(rows.filter(r => r.allowed)).toHaveLength(10)
    expect(rows.filter(r => !r.allowed)).toHaveLength(1)
  })

  it('20 parallel fills that together would cross the limit never overshoot it', async () => {
    const m = await filler(club)
    await logged(m, 4)
    const answers = await Promise.all(Array.from({ length: 20 }, () => record(m.cookie, fillBody(club, m))))
    const statuses = answers.map(a => a.status)
    expect(statuses.filter(s => s === 201)).toHaveLength(6)
    expect(statuses.filter(s => s === 422)).toHaveLength(14)
    for (const a of answers.filter(x => x.status === 422)) expect(codesOf(a.body)).toEqual(['PROOF_LAPSED'])
    const rows = await rowsOf(m.vesselId)
    expect(rows.filter(r => r.allowed)).toHaveLength(10)
    expect(rows.filter(r => !r.allowed)).toHaveLength(14)
  })
})
