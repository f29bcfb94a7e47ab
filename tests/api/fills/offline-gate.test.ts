import { randomUUID } from 'node:crypto'
import { describe, it, expect, beforeAll } from 'vitest'
import { clubDay, makeFillStation } from '../../support/factories'
import { check, codesOf, fillBody, fillClub, filler, otherEvent, person, record, type FillBody, type FillClub, type Filler, type Person } from './fill-support'
import { decideOffline, releaseDevice, verifiedSnapshot } from './offline-support'
import { FILL_REASON_CODES, type FillReasonCode } from '../../../shared/utils/fill-reasons'

/**
 * THE gate fed from a freshly downloaded, verified snapshot answers every fill as the server does
 * (`/api/fills/check`, the same caller): the same allowed, the same reason codes, the same permitted
 * maximum and limiting factor. The device's reservation is released before the server is asked, so the
 * server counts the same fills.
 *
 * Two codes cannot arise on the device as they do online and are compared otherwise:
 * - NOT_ON_EVENT_STAFF: the device's caller is whoever downloaded the snapshot, who must be on the
 *   event's staff to get one; the shared gate is given another caller (an instructor not on the staff).
 * - EVENT_NOT_TODAY: a check looks ahead to a later event, a fill on the device is always a recording;
 *   a snapshot is issued only for an event today or to come, so a future event is compared with the
 *   server's recording (`POST /api/fills`, refused 422 with its reasons).
 */
let club: FillClub

interface Case {
  eventId: string
  body: FillBody
  /** Who downloads the snapshot (on the event's staff). */
  issuer: Person
  /** Who asks the server (default the issuer). */
  asker?: Person
  offline?: { callerId?: string, callerInstructor?: boolean }
  /** Compare with the server's recording instead of its check. */
  recording?: boolean
}

const CASES: Record<FillReasonCode, () => Promise<Case>> = {
  MEMBERSHIP_NOT_ACTIVE: async () => own(await filler(club, { paidDays: -5 })),
  WAIVER_NOT_ACCEPTED: async () => own(await filler(club, { acceptWaiver: false })),
  GUARDIAN_CONSENT_MISSING: async () => own(await filler(club, { rank: 1, birthDate: clubDay(-15 * 365) }), { pressure: 5, supervised: true }),
  NO_VALID_TIER: async () => own(await filler(club, { rank: null })),
  TIER_CAP_EXCEEDED: async () => own(await filler(club, { proofBar: 18 }), { pressure: 11 }),
  COURSE_NOT_CURRENT: async () => own(await filler(club, { courses: ['rig_operator'] })),
  VESSEL_NOT_IN_SERVICE: async () => own(await filler(club, { vesselState: 'quarantined' })),
  PROOF_LAPSED: async () => own(await filler(club, { proofDaysAgo: 400 })),
  RATED_FILL_EXCEEDED: async () => own(await filler(club, { rank: 3, courses: ['pressure_safety', 'rig_operator', 'composite_ppe'] }), { pressure: 11 }),
  EVENT_CAP_EXCEEDED: async () => own(await filler(club), { eventId: await otherEvent(club, { pressureCapBar: 7 }) }),
  EQUIPMENT_RATING_EXCEEDED: async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId, lowestPartRatingBar: 21 })
    return own(await filler(club), { stationId, eventId: await otherEvent(club, { stationIds: [stationId] }) })
  },
  GAUGE_CALIBRATION_DUE: async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId, gaugeCalibratedOn: clubDay(-400), gaugeIntervalMonths: 12 })
    return own(await filler(club), { stationId, eventId: await otherEvent(club, { stationIds: [stationId] }) })
  },
  METAL_IN_PRESSURE_PATH: async () => own(await filler(club, { metalInPressurePath: true }), { eventId: await otherEvent(club, { competition: true }) }),
  JUNIOR_UNSUPERVISED: async () => own(await filler(club, { rank: 1, birthDate: clubDay(-15 * 365), guardianConsent: true }), { pressure: 5 }),
  SUPERVISOR_NOT_QUALIFIED: async () => {
    // A safety officer on the staff records fills for others but is no instructor: they supervise nobody.
    const officer = await person(club.clubId, ['safety_officer'])
    const eventId = await otherEvent(club, { staffIds: [officer.memberId] })
    const m = await filler(club, { rank: 1 })
    return { eventId, issuer: officer, body: fillBody(club, m, { eventId, supervised: true }) }
  },
  NOT_ON_EVENT_STAFF: async () => {
    const outsider = await person(club.clubId, ['instructor'])
    const c = await own(await filler(club))
    return { ...c, asker: outsider, offline: { callerId: outsider.memberId, callerInstructor: true } }
  },
  STATION_NOT_AT_EVENT: async () => own(await filler(club), { stationId: (await makeFillStation({ clubId: club.clubId })).stationId }),
  EVENT_NOT_TODAY: async () => ({ ...await own(await filler(club), { eventId: await otherEvent(club, { heldOn: clubDay(7) }) }), recording: true }),
}

/** The fill of `m`'s vessel at the club's event (8 bar unless `o` says otherwise), downloaded and asked by the instructor on its staff. */
async function own(m: Filler, o: Partial<FillBody> = {}): Promise<Case> {
  const body = fillBody(club, m, o)
  return { eventId: body.eventId, issuer: club.instructor, body }
}

/** Both answers on one case: THE gate on the snapshot, then (the device released) the server's. */
async function bothAnswers(c: Case) {
  const deviceId = randomUUID()
  const snapshot = await verifiedSnapshot(c.issuer.cookie, c.eventId, deviceId)
  const offline = decideOffline(snapshot, c.body, c.offline)
  expect((await releaseDevice(c.issuer.cookie, c.eventId, deviceId)).status).toBe(204)
  const asker = (c.asker ?? c.issuer).cookie
  const res = c.recording ? await record(asker, c.body) : await check(asker, c.body)
  const online = c.recording ? { ...res.body.data, allowed: res.status === 201 } : res.body
  return { offline, online, status: res.status }
}

beforeAll(async () => {
  club = await fillClub()
})

describe('the gate on a downloaded snapshot and the server agree', () => {
  it('names a case for every reason code', () => {
    expect(Object.keys(CASES).sort()).toEqual([...FILL_REASON_CODES].sort())
  })

  it('an allowed fill: allowed on both, the same maximum and limiting factor', async () => {
    const { offline, online } = await bothAnswers(await own(await filler(club)))
    expect(offline).toMatchObject({ allowed: true, reasons: [] })
    expect(online).toMatchObject({ allowed: true, reasons: [], permittedMaxBar: offline.permittedMaxBar, limitingFactor: offline.limitingFactor })
  })

  for (const code of FILL_REASON_CODES) {
    it(`${code}: the same refusal, the same codes`, async () => {
      const { offline, online, status } = await bothAnswers(await CASES[code]())
      expect(status, JSON.stringify(online)).toBe(code === 'EVENT_NOT_TODAY' ? 422 : 200)
      expect(offline.reasons.map(r => r.code)).toEqual([code])
      expect(online.allowed).toBe(false)
      expect(codesOf(online)).toEqual(offline.reasons.map(r => r.code))
      expect(online).toMatchObject({ permittedMaxBar: offline.permittedMaxBar, limitingFactor: offline.limitingFactor })
    })
  }
})
