import { beforeAll, describe, expect, it } from 'vitest'
import ICAL from 'ical.js'
import { api } from '../../support/http'
import { makeStation, openEveryDay, tokenHash } from '../../support/factories'
import { sql } from '../../support/db'
import { book, bookingClub, member, type SignedIn } from './support'
import type { CalendarFeedDto } from '../../../shared/types/bookings'

/** The feed at `url` fetched as a calendar program would: no cookie. */
async function fetchFeed(url: string) {
  const res = await api<string>(new URL(url).pathname, { headers: { accept: 'text/calendar' } })
  return res
}

describe('the private iCalendar feed of my bookings (RFC 5545)', () => {
  let m: SignedIn
  let station: string

  beforeAll(async () => {
    const { clubId, trainer } = await bookingClub()
    m = await member(clubId, trainer.memberId)
    station = (await makeStation({ clubId, name: 'Laminating bench with a long name for folding the lines of the feed', openingHours: openEveryDay() })).stationId
  })

  it('serves my live bookings with PRODID, VERSION, UID, DTSTAMP and DTSTART/DTEND in UTC, lines folded at 75 octets', async () => {
    // 10:30 British Summer Time on 15 June 2030 is 09:30 UTC.
    const made = await book(m.cookie, { stationId: station, startsAt: '2030-06-15T10:30', endsAt: '2030-06-15T12:00', note: 'Overwrap, three plies of 300 g/m² glass' })
    expect(made.status).toBe(201)
    const cancelled = await book(m.cookie, { stationId: station, startsAt: '2030-06-16T10:30', endsAt: '2030-06-16T12:00' })
    await api(`/api/bookings/${cancelled.body.booking.id}/cancel`, { method: 'POST', as: m.cookie, body: {} })
    const link = await api<CalendarFeedDto>('/api/me/calendar-feed', { method: 'POST', as: m.cookie, body: { renew: true } })
    expect(link.status).toBe(200)
    const token = link.body.url!.split('/').pop()!
    // Only the token's SHA-256 is stored.
    expect(await sql('SELECT 1 FROM booking_feed_tokens WHERE token_sha256 = $1', [tokenHash(token)])).toHaveLength(1)
    expect(await sql('SELECT 1 FROM booking_feed_tokens WHERE token_sha256 = $1', [token])).toHaveLength(0)

    const res = await fetchFeed(link.body.url!)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/calendar/)
    const text = res.body
    const lines = text.split('\r\n')
    expect(lines.every(line => Buffer.byteLength(line) <= 75)).toBe(true) // RFC 5545 §3.1
    expect(lines.some(line => line.startsWith(' '))).toBe(true) // a long line was folded
    expect(lines).toContain('DTSTART:20300615T093000Z')
    expect(lines).toContain('DTEND:20300615T110000Z')

    const calendar = new ICAL.Component(ICAL.parse(text))
    expect(calendar.getFirstPropertyValue('version')).toBe('2.0')
    expect(String(calendar.getFirstPropertyValue('prodid'))).toMatch(/Hoopwise/)
    const events = calendar.getAllSubcomponents('vevent')
    expect(events).toHaveLength(1) // the cancelled one is left out
    const event = new ICAL.Event(events[0]!)
    expect(event.uid).toBe(`${made.body.booking.id}@hoopwise`)
    expect(event.startDate.zone?.tzid).toBe('UTC')
    expect(event.startDate.toJSDate().toISOString()).toBe('2030-06-15T09:30:00.000Z')
    expect(event.endDate.toJSDate().toISOString()).toBe('2030-06-15T11:00:00.000Z')
    expect(events[0]!.getFirstPropertyValue('dtstamp')).toBeTruthy()
    expect(event.summary).toContain('Laminating bench with a long name for folding the lines of the feed')
    expect(event.description).toContain('Overwrap, three plies of 300 g/m² glass')
  })

  it('renewing stops the old link at once; revoking stops the new one; an unknown token is 404', async () => {
    const first = await api<CalendarFeedDto>('/api/me/calendar-feed', { method: 'POST', as: m.cookie, body: { renew: true } })
    const second = await api<CalendarFeedDto>('/api/me/calendar-feed', { method: 'POST', as: m.cookie, body: { renew: true } })
    expect(first.body.url).not.toBe(second.body.url)
    expect((await fetchFeed(first.body.url!)).status).toBe(404)
    expect((await fetchFeed(second.body.url!)).status).toBe(200)
    expect((await api<CalendarFeedDto>('/api/me/calendar-feed', { as: m.cookie })).body).toMatchObject({ active: true })
    expect((await api('/api/me/calendar-feed', { method: 'DELETE', as: m.cookie })).status).toBe(200)
    expect((await fetchFeed(second.body.url!)).status).toBe(404)
    expect((await api<CalendarFeedDto>('/api/me/calendar-feed', { as: m.cookie })).body).toEqual({ active: false, createdAt: null })
    expect((await api('/api/calendar/not-a-token')).status).toBe(404)
    expect((await api('/api/me/calendar-feed', { method: 'POST', as: m.cookie, body: {} })).status).toBe(400)
  })
})
