import { QueryTypes, type Transaction } from 'sequelize'
import { ExclusionConstraintError } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { actorCan } from '../../utils/auth'
import { lockBooking } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { coursesNotCurrent } from '../training'
import type { BookingInput } from '#shared/schemas/bookings'
import type { BookingDto, BookingMadeDto, BookingWeekDto } from '#shared/types/bookings'
import { instantToLocal, localToInstant, mondayOf } from '#shared/utils/booking-time'
import { addCalendarDays, formatInstant } from '#shared/utils/dates'
import { isJunior } from '#shared/utils/membership-status'
import type { StationKind } from '#shared/utils/stations'
import { bookingRefusals } from './rules'
import { loadStations, stationDto } from './stations'

interface BookingRow {
  id: string
  station_id: string
  station_name: string
  station_kind: StationKind
  membership_id: string
  member_name: string
  starts_at: Date
  ends_at: Date
  note: string
  cure_for_booking_id: string | null
  cancelled_at: Date | null
  cancel_reason: string | null
}

const BOOKING_SELECT = `
  SELECT b.id, b.station_id, s.name AS station_name, s.kind AS station_kind, b.membership_id, u.name AS member_name,
    b.starts_at, b.ends_at, b.note, b.cure_for_booking_id, b.cancelled_at, b.cancel_reason
  FROM bookings b JOIN stations s ON s.id = b.station_id
  JOIN memberships m ON m.id = b.membership_id JOIN users u ON u.id = m.user_id`

/** A booking row as `viewer` may see it: the booker's name only for their own and for officers. */
function bookingDto(r: BookingRow, viewer: Actor): BookingDto {
  const mine = r.membership_id === viewer.membership.id
  const named = mine || actorCan(viewer, 'bookings.cancel_any')
  const tz = viewer.club.timeZone
  return {
    id: r.id, station: { id: r.station_id, name: r.station_name, kind: r.station_kind },
    startsAt: r.starts_at.toISOString(), endsAt: r.ends_at.toISOString(),
    startsLocal: instantToLocal(r.starts_at, tz), endsLocal: instantToLocal(r.ends_at, tz),
    member: named ? { id: r.membership_id, name: r.member_name } : null, mine, note: mine || named ? r.note : '',
    cureForBookingId: r.cure_for_booking_id, cancelledAt: r.cancelled_at?.toISOString() ?? null,
    cancelReason: mine || named ? r.cancel_reason : null,
  }
}

async function loadBookings(where: string, replacements: Record<string, unknown>, transaction?: Transaction): Promise<BookingRow[]> {
  return useDb().query<BookingRow>(`${BOOKING_SELECT} WHERE ${where} ORDER BY b.starts_at, s.position, s.name LIMIT 1000`,
    { replacements, type: QueryTypes.SELECT, transaction })
}

/** 409 naming the live booking of `stationId` that overlaps [start, end): the slot it holds. */
async function overlapConflict(clubId: string, stationId: string, start: Date, end: Date, message: string): Promise<never> {
  const [slot] = await useDb().query<{ starts_at: Date, ends_at: Date }>(
    `SELECT starts_at, ends_at FROM bookings WHERE club_id = :clubId AND station_id = :stationId AND cancelled_at IS NULL
       AND during && tstzrange(:start, :end, '[)') ORDER BY starts_at LIMIT 1`,
    { replacements: { clubId, stationId, start, end }, type: QueryTypes.SELECT })
  throw createError({
    statusCode: 409, statusMessage: 'Conflict', message,
    data: { conflict: slot ? { stationId, startsAt: slot.starts_at.toISOString(), endsAt: slot.ends_at.toISOString() } : null },
  })
}

class NoCureSlot extends Error {}

async function insertBooking(values: { clubId: string, stationId: string, membershipId: string, start: Date, end: Date, note: string, cureFor?: string | null }, transaction: Transaction): Promise<string> {
  const [row] = await useDb().query<{ id: string }>(
    `INSERT INTO bookings (club_id, station_id, membership_id, starts_at, ends_at, note, cure_for_booking_id)
     VALUES (:clubId, :stationId, :membershipId, :start, :end, :note, :cureFor) RETURNING id`,
    { replacements: { ...values, cureFor: values.cureFor ?? null }, type: QueryTypes.SELECT, transaction })
  return row!.id
}

/**
 * Takes the first cure-rack slot of club `clubId` free over [start, end) for bench booking `benchId`,
 * inside `transaction`. Each slot is tried under a savepoint: when the exclusion constraint says another
 * booking holds it (perhaps one committed at this very moment), that attempt alone is undone and the
 * next slot is tried. Throws NoCureSlot when none is free; any other failure undoes the whole booking.
 */
async function takeCureHold(clubId: string, slotIds: string[], membershipId: string, benchId: string, start: Date, end: Date, transaction: Transaction): Promise<string> {
  for (const [i, stationId] of slotIds.entries()) {
    const savepoint = `cure_slot_${i}`
    await useDb().query(`SAVEPOINT ${savepoint}`, { transaction })
    try {
      const id = await insertBooking({ clubId, stationId, membershipId, start, end, note: 'Cure hold', cureFor: benchId }, transaction)
      await useDb().query(`RELEASE SAVEPOINT ${savepoint}`, { transaction })
      return id
    }
    catch (error) {
      if (!(error instanceof ExclusionConstraintError)) throw error
      await useDb().query(`ROLLBACK TO SAVEPOINT ${savepoint}`, { transaction })
    }
  }
  throw new NoCureSlot()
}

/**
 * `actor` books a station: wall-clock times in the club's zone are turned into instants, every rule is
 * checked at once (422 with all the reasons), and the booking — with its cure hold on the first free
 * cure-rack slot, when asked — is written in one transaction, or nothing is. The database's exclusion
 * constraint decides between simultaneous bookings: the loser gets 409 with the slot it collided with.
 * The member is e-mailed (booking_confirmed, optional).
 */
export async function createBooking(actor: Actor, input: BookingInput, now = new Date()): Promise<BookingMadeDto> {
  const club = actor.club
  const today = clubToday(club, now)
  const [station] = await loadStations(club.id, { stationId: input.stationId })
  if (!station) notFound('No such station')
  const wantsCureHold = !!input.cureHoldHours
  const cureSlots = wantsCureHold && station.kind === 'laminating_bench' ? await loadStations(club.id, { kind: 'cure_rack_slot' }) : []
  const codes = [...new Set([...station.required_courses, ...cureSlots.flatMap(s => s.required_courses)])]
  const startsAt = localToInstant(input.startsAt, club.timeZone)
  const endsAt = localToInstant(input.endsAt, club.timeZone)
  const reasons = bookingRefusals({
    status: actor.status,
    coursesNotCurrent: (await coursesNotCurrent(club.id, actor.membership.id, codes, today)).map(c => ({ code: c.code, name: c.name, standing: c.standing })),
    junior: isJunior(actor.membership.birthDate, today),
    station: { adultsOnly: station.adults_only, maxBookingMinutes: station.max_booking_minutes, openingHours: station.opening_hours, isBench: station.kind === 'laminating_bench' },
    startsLocal: input.startsAt, endsLocal: input.endsAt, startsAt, endsAt, now, timeZone: club.timeZone, wantsCureHold,
  })
  if (reasons.length) refuse(reasons)
  const start = startsAt!
  const end = endsAt!
  const cureEnd = new Date(end.getTime() + (input.cureHoldHours ?? 0) * 3_600_000)
  let ids: { booking: string, cure: string | null }
  try {
    ids = await inTransaction(async (transaction) => {
      const booking = await insertBooking({ clubId: club.id, stationId: station.id, membershipId: actor.membership.id, start, end, note: input.note ?? '' }, transaction)
      const cure = wantsCureHold ? await takeCureHold(club.id, cureSlots.map(s => s.id), actor.membership.id, booking, end, cureEnd, transaction) : null
      await enqueueNotice({
        clubId: club.id, membershipId: actor.membership.id, kind: 'booking_confirmed', subjectKey: booking, dueOn: today,
        toEmail: actor.user.email, optOuts: actor.membership.noticeOptOuts,
        vars: {
          clubName: club.name, memberName: actor.user.name, baseUrl: clubBaseUrl(club), stationName: station.name,
          startsText: formatInstant(start.toISOString(), club.timeZone), endsText: formatInstant(end.toISOString(), club.timeZone),
          cureText: cure ? `A cure hold on the cure rack follows it until ${formatInstant(cureEnd.toISOString(), club.timeZone)}.` : '',
        },
      }, transaction)
      return { booking, cure }
    })
  }
  catch (error) {
    if (error instanceof NoCureSlot) {
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'No cure-rack slot is free for the cure hold; nothing was booked.', data: { conflict: null } })
    }
    if (error instanceof ExclusionConstraintError) await overlapConflict(club.id, station.id, start, end, `${station.name} is already booked then.`)
    throw error
  }
  kickNoticeQueue()
  const rows = await loadBookings('b.id IN (:ids)', { ids: [ids.booking, ids.cure].filter(Boolean) })
  const dto = (id: string | null) => {
    const row = rows.find(r => r.id === id)
    return row ? bookingDto(row, actor) : null
  }
  return { booking: dto(ids.booking)!, cureHold: dto(ids.cure) }
}

/**
 * Cancels booking `id` (and the cure hold that follows it): the member their own until it starts; an
 * officer with `bookings.cancel_any` any booking, giving a reason when it is someone else's (audited).
 * 404 for a booking that is not the actor's and that they may not cancel. The member is e-mailed.
 */
export async function cancelBooking(actor: Actor, id: string, reason: string | undefined, now = new Date()): Promise<BookingDto> {
  const club = actor.club
  const officer = actorCan(actor, 'bookings.cancel_any')
  await inTransaction(async (transaction) => {
    const row = await lockBooking(club.id, id, transaction)
    const own = row?.membership_id === actor.membership.id
    if (!row || (!own && !officer)) notFound('No such booking')
    if (row.cancelled_at) refuse({ code: 'ALREADY_CANCELLED', message: 'This booking is already cancelled.' })
    if (!officer && row.starts_at <= now) refuse({ code: 'BOOKING_STARTED', message: 'A booking can be cancelled only until it starts.' })
    if (!own && !reason) refuse({ code: 'REASON_REQUIRED', message: 'Say why you cancel another member\'s booking.' })
    await useDb().query(
      `UPDATE bookings SET cancelled_at = :now, cancelled_by_membership_id = :by, cancel_reason = :reason
        WHERE club_id = :clubId AND (id = :id OR cure_for_booking_id = :id) AND cancelled_at IS NULL`,
      { replacements: { now, by: actor.membership.id, reason: reason || null, clubId: club.id, id }, transaction })
    if (!own) {
      await recordAudit(actor, club.id, {
        action: 'booking.cancel', subjectType: 'booking', subjectId: id,
        before: { status: 'booked', stationId: row.station_id, startsAt: row.starts_at.toISOString(), endsAt: row.ends_at.toISOString(), membershipId: row.membership_id },
        after: { status: 'cancelled' }, reason,
      }, transaction)
    }
    const [member] = await useDb().query<{ email: string, name: string, notice_opt_outs: string[], station_name: string }>(
      `SELECT u.email, u.name, m.notice_opt_outs, s.name AS station_name FROM memberships m JOIN users u ON u.id = m.user_id
         JOIN stations s ON s.id = :stationId WHERE m.id = :membershipId`,
      { replacements: { membershipId: row.membership_id, stationId: row.station_id }, type: QueryTypes.SELECT, transaction })
    await enqueueNotice({
      clubId: club.id, membershipId: row.membership_id, kind: 'booking_cancelled', subjectKey: id, dueOn: clubToday(club, now),
      toEmail: member!.email, optOuts: member!.notice_opt_outs,
      vars: {
        clubName: club.name, memberName: member!.name, baseUrl: clubBaseUrl(club), stationName: member!.station_name,
        startsText: formatInstant(row.starts_at.toISOString(), club.timeZone), endsText: formatInstant(row.ends_at.toISOString(), club.timeZone),
        reasonText: own ? '' : `An officer cancelled it: ${reason}`,
      },
    }, transaction)
  })
  kickNoticeQueue()
  const [row] = await loadBookings('b.id = :id AND b.club_id = :clubId', { id, clubId: club.id })
  return bookingDto(row!, actor)
}

/**
 * The week view: the stations of the actor's club (or one of them) and their live bookings from Monday
 * 00:00 to the next Monday 00:00, wall clock in the club's zone, for the week holding `day` (default today).
 */
export async function bookingWeek(actor: Actor, opts: { week?: string, stationId?: string }): Promise<BookingWeekDto> {
  const club = actor.club
  const weekStart = mondayOf(opts.week ?? clubToday(club))
  const days = Array.from({ length: 7 }, (_, i) => addCalendarDays(weekStart, i))
  const from = localToInstant(`${weekStart}T00:00`, club.timeZone) ?? new Date(`${weekStart}T00:00:00Z`)
  const to = localToInstant(`${addCalendarDays(weekStart, 7)}T00:00`, club.timeZone) ?? new Date(`${addCalendarDays(weekStart, 7)}T00:00:00Z`)
  const stations = await loadStations(club.id, { stationId: opts.stationId })
  if (opts.stationId && !stations.length) notFound('No such station')
  const rows = await loadBookings(
    `b.club_id = :clubId AND b.cancelled_at IS NULL AND b.during && tstzrange(:from, :to, '[)') ${opts.stationId ? 'AND b.station_id = :stationId' : ''}`,
    { clubId: club.id, from, to, stationId: opts.stationId ?? null })
  return { weekStart, days, timeZone: club.timeZone, stations: stations.map(stationDto), bookings: rows.map(r => bookingDto(r, actor)) }
}

/** The actor's own bookings: every one not yet over, and those of the last 30 days, cancelled ones included. */
export async function myBookings(actor: Actor, now = new Date()): Promise<BookingDto[]> {
  const rows = await loadBookings('b.membership_id = :membershipId AND b.club_id = :clubId AND b.ends_at > :since',
    { membershipId: actor.membership.id, clubId: actor.club.id, since: new Date(now.getTime() - 30 * 86_400_000) })
  return rows.map(r => bookingDto(r, actor))
}
