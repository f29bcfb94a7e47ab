import { describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import type { StationDto } from '../../../shared/types/bookings'

const hours = Array.from({ length: 7 }, (_, i) => (i === 0 ? null : { opens: '09:00', closes: '21:00' }))
const station = (name: string, change: Record<string, unknown> = {}) => ({
  name, kind: 'sanding_booth', requiredCourses: ['composite_ppe', 'respirator_fit'], maxBookingMinutes: 120, openingHours: hours, adultsOnly: true, ...change,
})

describe('stations are club-configurable (stations.manage)', () => {
  it('the safety officer adds and changes a station, audited; every member sees it with its course names', async () => {
    const name = `Booth ${Date.now()}`
    const made = await api<StationDto>('/api/stations', { method: 'POST', as: 'safety', body: station(name) })
    expect(made.status).toBe(201)
    expect(made.body).toMatchObject({ name, kind: 'sanding_booth', maxBookingMinutes: 120, adultsOnly: true, openingHours: hours })
    expect(made.body.requiredCourses).toEqual([{ code: 'composite_ppe', name: 'Composite handling and PPE' }, { code: 'respirator_fit', name: 'Respirator fit test' }])
    const changed = await api<StationDto>(`/api/stations/${made.body.id}`, { method: 'PUT', as: 'admin', body: station(name, { maxBookingMinutes: 90, adultsOnly: false }) })
    expect(changed.status).toBe(200)
    expect(changed.body).toMatchObject({ maxBookingMinutes: 90, adultsOnly: false })
    const listed = await api<StationDto[]>('/api/stations', { as: 'member' })
    expect(listed.body.find(s => s.id === made.body.id)).toMatchObject({ maxBookingMinutes: 90 })
    const audit = await sql<{ action: string }>('SELECT action FROM audit_events WHERE subject_id = $1 ORDER BY created_at', [made.body.id])
    expect(audit.map(a => a.action)).toEqual(['station.create', 'station.update'])
    expect((await api('/api/stations', { method: 'POST', as: 'safety', body: station(name) })).status).toBe(409)
  })

  it('refuses an unknown course (422), bad hours and limits (400), and a member (403)', async () => {
    const unknown = await api('/api/stations', { method: 'POST', as: 'safety', body: station(`X ${Date.now()}`, { requiredCourses: ['underwater_basket_weaving'] }) })
    expect(unknown.status).toBe(422)
    expect(unknown.body.data.reasons[0].code).toBe('UNKNOWN_COURSE')
    for (const bad of [
      { openingHours: hours.slice(0, 6) },
      { openingHours: [{ opens: '21:00', closes: '09:00' }, ...hours.slice(1)] },
      { openingHours: [{ opens: '9am', closes: '17:00' }, ...hours.slice(1)] },
      { maxBookingMinutes: 10 },
      { maxBookingMinutes: 20_000 },
      { kind: 'kiln' },
    ]) {
      const res = await api('/api/stations', { method: 'POST', as: 'safety', body: station(`Y ${Date.now()}`, bad) })
      expect(res.status, JSON.stringify(bad)).toBe(400)
    }
    expect((await api('/api/stations', { method: 'POST', as: 'member', body: station(`Z ${Date.now()}`) })).status).toBe(403)
  })

  it('the demo club has the seeded stations with their courses and adults-only rule', async () => {
    const listed = await api<StationDto[]>('/api/stations', { as: 'member' })
    const byName = new Map(listed.body.map(s => [s.name, s]))
    expect(byName.get('Laminating bench A')).toMatchObject({ kind: 'laminating_bench', adultsOnly: true, requiredCourses: [{ code: 'composite_ppe' }] })
    expect(byName.get('Cure rack slot 6')).toMatchObject({ kind: 'cure_rack_slot', adultsOnly: true })
    expect(byName.get('Sanding booth (extraction)')!.requiredCourses.map(c => c.code)).toEqual(['composite_ppe', 'respirator_fit'])
    expect(byName.get('Hydrostatic test rig')).toMatchObject({ adultsOnly: false, requiredCourses: [{ code: 'rig_operator' }] })
  })
})
