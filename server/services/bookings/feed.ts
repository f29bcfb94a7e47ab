import { createHash, randomBytes } from 'node:crypto'
import { QueryTypes } from 'sequelize'
import ical from 'ical-generator'
import type { Actor } from '../../utils/auth'
import { clubBaseUrl } from '../clubs'
import type { CalendarFeedDto } from '#shared/types/bookings'

const sha256 = (token: string) => createHash('sha256').update(token).digest('hex')

/** The path of the calendar feed for `token`, under the club's address. */
export function calendarFeedPath(token: string): string {
  return `/api/calendar/${token}`
}

/** Whether the actor has a private calendar link, and since when. */
export async function calendarFeedStatus(actor: Actor): Promise<CalendarFeedDto> {
  const [row] = await useDb().query<{ created_at: Date }>('SELECT created_at FROM booking_feed_tokens WHERE membership_id = :id',
    { replacements: { id: actor.membership.id }, type: QueryTypes.SELECT })
  return { active: !!row, createdAt: row?.created_at.toISOString() ?? null }
}

/**
 * Makes the actor a new private calendar link: 32 random bytes, of which only the SHA-256 is kept, so
 * the link is shown this once; the old link stops working at once.
 */
export async function renewCalendarFeed(actor: Actor): Promise<CalendarFeedDto> {
  const token = randomBytes(32).toString('base64url')
  const [row] = await useDb().query<{ created_at: Date }>(
    `INSERT INTO booking_feed_tokens (membership_id, token_sha256) VALUES (:id, :hash)
     ON CONFLICT (membership_id) DO UPDATE SET token_sha256 = EXCLUDED.token_sha256, created_at = now()
     RETURNING created_at`,
    { replacements: { id: actor.membership.id, hash: sha256(token) }, type: QueryTypes.SELECT })
  return { active: true, createdAt: row!.created_at.toISOString(), url: `${clubBaseUrl(actor.club)}${calendarFeedPath(token)}` }
}

/** Revokes the actor's private calendar link: it answers 404 from now on. */
export async function revokeCalendarFeed(actor: Actor): Promise<CalendarFeedDto> {
  await useDb().query('DELETE FROM booking_feed_tokens WHERE membership_id = :id', { replacements: { id: actor.membership.id } })
  return { active: false, createdAt: null }
}

interface FeedRow { id: string, station_name: string, starts_at: Date, ends_at: Date, created_at: Date, note: string, cure_for_booking_id: string | null, club_name: string, public_url: string }

/**
 * The iCalendar (RFC 5545) feed of the live bookings of whoever holds `token`, from 30 days back: one
 * VEVENT each with a stable UID, DTSTAMP, and DTSTART/DTEND in UTC; ical-generator writes PRODID and
 * VERSION and folds long lines at 75 octets. Null for an unknown or revoked token.
 */
export async function calendarFeed(token: string, now = new Date()): Promise<string | null> {
  const [owner] = await useDb().query<{ membership_id: string, suspended_at: Date | null, resigned_at: Date | null }>(
    `SELECT t.membership_id, m.suspended_at, m.resigned_at FROM booking_feed_tokens t JOIN memberships m ON m.id = t.membership_id
      WHERE t.token_sha256 = :hash`,
    { replacements: { hash: sha256(token) }, type: QueryTypes.SELECT })
  if (!owner || owner.suspended_at || owner.resigned_at) return null
  const rows = await useDb().query<FeedRow>(
    `SELECT b.id, s.name AS station_name, b.starts_at, b.ends_at, b.created_at, b.note, b.cure_for_booking_id, c.name AS club_name, c.public_url
       FROM bookings b JOIN stations s ON s.id = b.station_id JOIN clubs c ON c.id = b.club_id
      WHERE b.membership_id = :id AND b.cancelled_at IS NULL AND b.ends_at > :since
      ORDER BY b.starts_at LIMIT 1000`,
    { replacements: { id: owner.membership_id, since: new Date(now.getTime() - 30 * 86_400_000) }, type: QueryTypes.SELECT })
  const clubName = rows[0]?.club_name ?? 'Hoopwise'
  const calendar = ical({
    name: `${clubName}: my workshop bookings`,
    prodId: { company: 'Hoopwise', product: 'Workshop bookings', language: 'EN' },
    ttl: 3600,
  })
  for (const r of rows) {
    calendar.createEvent({
      id: `${r.id}@hoopwise`,
      start: r.starts_at,
      end: r.ends_at,
      stamp: r.created_at,
      summary: r.cure_for_booking_id ? `Cure hold: ${r.station_name}` : `${r.station_name} (workshop booking)`,
      description: [r.note, `Booked at ${r.club_name}. Gloves, eye protection and ventilation for any resin work; resin and hardener sensitise skin.`].filter(Boolean).join('\n'),
      location: `${r.club_name} workshop`,
      url: `${r.public_url.replace(/\/+$/, '')}/workshop/mine`,
    })
  }
  return calendar.toString()
}
