import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { clubDay, makeFillStation, makeLaunchEvent, makeMember, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { FillDeskDto } from '../../../shared/types/fill-passes'

async function memberWithCookie(o: Parameters<typeof makeMember>[0] = {}): Promise<MadeMember & { cookie: string }> {
  const m = await makeMember(o)
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

describe('GET /api/events/[id]/fill-desk: what the launch-side fill page needs', () => {
  let staff: MadeMember & { cookie: string }
  let outsider: MadeMember & { cookie: string }
  let registered: MadeMember & { cookie: string }
  let eventId = ''
  let stationName = ''

  beforeAll(async () => {
    staff = await memberWithCookie({ roles: ['instructor'] })
    outsider = await memberWithCookie({ roles: ['instructor'] })
    registered = await memberWithCookie({ name: 'Rae Registered' })
    const station = await makeFillStation({ lowestPartRatingBar: 60, gaugeCalibratedOn: clubDay(-10), gaugeIntervalMonths: 6 })
    stationName = station.name
    eventId = (await makeLaunchEvent({ createdBy: staff.memberId, heldOn: clubDay(3), site: 'Dune flat', pressureCapBar: 12, competition: true, stationIds: [station.stationId], staffIds: [staff.memberId], registeredIds: [registered.memberId] })).eventId
  })

  it('gives the event\'s staff the event, its stations (launch pressure = rating ÷ factor 3) and the registered members', async () => {
    const res = await api<FillDeskDto>(`/api/events/${eventId}/fill-desk`, { as: staff.cookie })
    expect(res.status).toBe(200)
    expect(res.body.event).toEqual({ id: eventId, heldOn: clubDay(3), site: 'Dune flat', pressureCapBar: 12, competition: true, cancelled: false })
    expect(res.body.stations).toHaveLength(1)
    expect(res.body.stations[0]).toMatchObject({ name: stationName })
    expect(res.body.stations[0]!.launchPressureBar).toBeCloseTo(20, 9)
    expect(res.body).toMatchObject({ staff: true, supervisor: true, today: clubDay(0), me: { id: staff.memberId } })
    expect(res.body.members).toEqual([{ id: registered.memberId, name: 'Rae Registered' }])
  })

  it('shows an instructor who is not on the staff, and a member, no list of members', async () => {
    for (const who of [outsider, registered]) {
      const res = await api<FillDeskDto>(`/api/events/${eventId}/fill-desk`, { as: who.cookie })
      expect(res.status).toBe(200)
      expect(res.body).toMatchObject({ staff: false, supervisor: false, members: [], me: { id: who.memberId } })
    }
  })

  it('answers 404 for no such event and for a malformed id', async () => {
    expect((await api(`/api/events/${staff.memberId}/fill-desk`, { as: staff.cookie })).status).toBe(404)
    expect((await api('/api/events/nope/fill-desk', { as: staff.cookie })).status).toBe(404)
  })
})
