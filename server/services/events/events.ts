import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockLaunchEvent } from '../../utils/locks'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue, type NoticeKindName } from '../notices'
import { enteredBar, type LaunchEventInput, type LaunchEventListQuery } from '#shared/schemas/events'
import type { EventPersonDto, FlaggedFillDto, LaunchEventDto, LaunchEventListItemDto } from '#shared/types/events'
import type { FillReason } from '#shared/utils/fill-reasons'
import type { Paged } from '#shared/types/common'
import { eventChangeProblem, registrationProblem, walkInProblem } from '#shared/utils/event-rules'
import { fillStationDto, loadFillStations } from './fill-stations'

/** The roles whose holders may be on an event's staff. */
export const EVENT_STAFF_ROLES = ['instructor', 'safety_officer'] as const

interface EventRow {
  id: string
  held_on: string
  site: string
  pressure_cap_bar: string
  competition: boolean
  notes: string
  cancelled_at: Date | null
  cancel_reason: string | null
  created_by_name: string | null
  registered_count: number
  registered: boolean
  total?: number
}

// One row per event with its live registrations counted and whether the viewer (:viewerId) is among them.
const EVENT_SELECT = `
  SELECT e.id, e.held_on::text AS held_on, e.site, e.pressure_cap_bar, e.competition, e.notes, e.cancelled_at, e.cancel_reason,
    cu.name AS created_by_name,
    (SELECT count(*) FROM launch_event_registrations r WHERE r.event_id = e.id AND r.withdrawn_at IS NULL)::int AS registered_count,
    EXISTS (SELECT 1 FROM launch_event_registrations r WHERE r.event_id = e.id AND r.membership_id = :viewerId AND r.withdrawn_at IS NULL) AS registered
  FROM launch_events e
  LEFT JOIN memberships cm ON cm.id = e.created_by_membership_id LEFT JOIN users cu ON cu.id = cm.user_id`

function listItem(r: EventRow): LaunchEventListItemDto {
  return {
    id: r.id, heldOn: r.held_on, site: r.site, pressureCapBar: Number(r.pressure_cap_bar), competition: r.competition,
    cancelled: r.cancelled_at !== null, registeredCount: r.registered_count, registered: r.registered,
  }
}

/** The club's events, upcoming (from today, soonest first) or past (latest first), a page at a time. */
export async function listLaunchEvents(actor: Actor, query: LaunchEventListQuery, now = new Date()): Promise<Paged<LaunchEventListItemDto>> {
  const today = clubToday(actor.club, now)
  const upcoming = query.when === 'upcoming'
  const rows = await useDb().query<EventRow>(
    `${EVENT_SELECT.replace('SELECT e.id', 'SELECT count(*) OVER ()::int AS total, e.id')}
     WHERE e.club_id = :clubId AND ${upcoming ? 'e.held_on >= :today' : 'e.held_on < :today'}
     ORDER BY e.held_on ${upcoming ? 'ASC' : 'DESC'}, e.created_at, e.id LIMIT :limit OFFSET :offset`,
    {
      replacements: { clubId: actor.club.id, viewerId: actor.membership.id, today, limit: query.pageSize, offset: (query.page - 1) * query.pageSize },
      type: QueryTypes.SELECT,
    })
  let total = rows[0]?.total ?? 0
  if (!rows.length && query.page > 1) {
    const [c] = await useDb().query<{ n: number }>(`SELECT count(*)::int AS n FROM launch_events e WHERE e.club_id = :clubId AND ${upcoming ? 'e.held_on >= :today' : 'e.held_on < :today'}`,
      { replacements: { clubId: actor.club.id, today }, type: QueryTypes.SELECT })
    total = c!.n
  }
  return { items: rows.map(listItem), page: query.page, pageSize: query.pageSize, total }
}

/** The fills of event `id` flagged after an offline sync, in the order the devices recorded them. */
async function flaggedFills(id: string, transaction?: Transaction): Promise<FlaggedFillDto[]> {
  const rows = await useDb().query<{ id: string, recorded_at: Date, member_id: string, member_name: string, vessel_tag: string, station_name: string, pressure_bar: number, recorded_by_name: string, reasons: FillReason[] }>(
    `SELECT f.id, f.recorded_offline_at AS recorded_at, f.membership_id AS member_id, u.name AS member_name, v.tag AS vessel_tag,
            st.name AS station_name, f.pressure_bar, ru.name AS recorded_by_name, f.flagged_reasons AS reasons
       FROM fills f JOIN memberships m ON m.id = f.membership_id JOIN users u ON u.id = m.user_id
       JOIN vessels v ON v.id = f.vessel_id JOIN fill_stations st ON st.id = f.station_id
       JOIN memberships rm ON rm.id = f.recorded_by_membership_id JOIN users ru ON ru.id = rm.user_id
      WHERE f.event_id = :id AND f.flagged_reasons IS NOT NULL
      ORDER BY f.recorded_offline_at, f.id`,
    { replacements: { id }, type: QueryTypes.SELECT, transaction })
  return rows.map(r => ({
    id: r.id, recordedAt: new Date(r.recorded_at).toISOString(), member: { id: r.member_id, name: r.member_name }, vesselTag: r.vessel_tag,
    stationName: r.station_name, pressureBar: r.pressure_bar, recordedByName: r.recorded_by_name, reasons: r.reasons,
  }))
}

/** Event `id` of the actor's club with its stations and staff as its page shows them, or null. */
export async function launchEventDetail(actor: Actor, id: string, now = new Date(), transaction?: Transaction): Promise<LaunchEventDto | null> {
  const clubId = actor.club.id
  const [row] = await useDb().query<EventRow>(`${EVENT_SELECT} WHERE e.id = :id AND e.club_id = :clubId`,
    { replacements: { id, clubId, viewerId: actor.membership.id }, type: QueryTypes.SELECT, transaction })
  if (!row) return null
  const today = clubToday(actor.club, now)
  const stationIds = await useDb().query<{ station_id: string }>('SELECT station_id FROM launch_event_stations WHERE event_id = :id',
    { replacements: { id }, type: QueryTypes.SELECT, transaction })
  const stations = (await loadFillStations(clubId, { ids: stationIds.map(s => s.station_id), transaction })).map(s => fillStationDto(s, today))
  const staff = await useDb().query<EventPersonDto>(
    `SELECT m.id, u.name FROM launch_event_staff s JOIN memberships m ON m.id = s.membership_id JOIN users u ON u.id = m.user_id
      WHERE s.event_id = :id ORDER BY u.name, m.id`, { replacements: { id }, type: QueryTypes.SELECT, transaction })
  const facts = { heldOn: row.held_on, cancelled: row.cancelled_at !== null }
  const onStaff = staff.some(s => s.id === actor.membership.id)
  return {
    ...listItem(row), notes: row.notes, cancelReason: row.cancel_reason, stations, staff, createdByName: row.created_by_name, today,
    flaggedFills: onStaff || actor.roles.includes('safety_officer') ? await flaggedFills(id, transaction) : null,
    mine: {
      onStaff,
      registrationProblem: registrationProblem(facts, today),
      walkInProblem: walkInProblem(facts, today),
    },
  }
}

/** The club's members who may be on an event's staff (instructors and safety officers in good standing). */
export async function staffChoices(clubId: string, transaction?: Transaction): Promise<EventPersonDto[]> {
  return useDb().query<EventPersonDto>(
    `SELECT m.id, u.name FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE m.club_id = :clubId AND m.roles && ARRAY[:roles]::text[] AND m.suspended_at IS NULL AND m.resigned_at IS NULL
      ORDER BY u.name, m.id`,
    { replacements: { clubId, roles: [...EVENT_STAFF_ROLES] }, type: QueryTypes.SELECT, transaction })
}

/** 422 unless every station is a live fill station of the club and every staff member an instructor or safety officer of it. */
async function checkStationsAndStaff(clubId: string, input: LaunchEventInput, transaction: Transaction): Promise<void> {
  const stations = await loadFillStations(clubId, { ids: input.stationIds, transaction })
  const reasons: { code: string, message: string }[] = []
  if (stations.length !== input.stationIds.length || stations.some(s => s.retired_at)) {
    reasons.push({ code: 'UNKNOWN_FILL_STATION', message: 'Choose fill stations the club uses now (not retired ones).' })
  }
  const choices = new Set((await staffChoices(clubId, transaction)).map(s => s.id))
  if (input.staffIds.some(id => !choices.has(id))) {
    reasons.push({ code: 'NOT_STAFF_MATERIAL', message: 'An event\'s staff are the club\'s instructors and safety officers.' })
  }
  if (reasons.length) refuse(reasons)
}

async function setStationsAndStaff(clubId: string, id: string, input: LaunchEventInput, transaction: Transaction): Promise<void> {
  const r = { clubId, id, stationIds: input.stationIds, staffIds: input.staffIds }
  await useDb().query('DELETE FROM launch_event_stations WHERE event_id = :id AND NOT (station_id = ANY(ARRAY[:stationIds]::uuid[]))', { replacements: r, transaction })
  await useDb().query(`INSERT INTO launch_event_stations (event_id, club_id, station_id) SELECT :id, :clubId, unnest(ARRAY[:stationIds]::uuid[])
    ON CONFLICT DO NOTHING`, { replacements: r, transaction })
  await useDb().query('DELETE FROM launch_event_staff WHERE event_id = :id AND NOT (membership_id = ANY(ARRAY[:staffIds]::uuid[]))', { replacements: r, transaction })
  await useDb().query(`INSERT INTO launch_event_staff (event_id, club_id, membership_id) SELECT :id, :clubId, unnest(ARRAY[:staffIds]::uuid[])
    ON CONFLICT DO NOTHING`, { replacements: r, transaction })
}

// The cap is kept to the hundredth of a bar, rounded down from what was entered.
const capBar = (input: LaunchEventInput) => Math.floor(enteredBar(input.pressureCap, input.unit) * 100 + 1e-9) / 100

/** What the audit trail keeps of an event: its day, site, cap, competition flag, stations and staff (ids). */
const auditView = (e: { heldOn: string, site: string, pressureCapBar: number, competition: boolean, stationIds: string[], staffIds: string[] }) => ({
  heldOn: e.heldOn, site: e.site, pressureCapBar: e.pressureCapBar, competition: e.competition,
  stationIds: [...e.stationIds].sort(), staffIds: [...e.staffIds].sort(),
})

/** A safety officer or admin (`events.manage`) creates a launch event, today or later (audited). 201 with it. */
export async function createLaunchEvent(actor: Actor, input: LaunchEventInput, now = new Date()): Promise<LaunchEventDto> {
  const clubId = actor.club.id
  if (input.heldOn < clubToday(actor.club, now)) refuse({ code: 'EVENT_IN_THE_PAST', message: 'An event is held today or later.' })
  const id = await inTransaction(async (transaction) => {
    await checkStationsAndStaff(clubId, input, transaction)
    const [row] = await useDb().query<{ id: string }>(
      `INSERT INTO launch_events (club_id, held_on, site, pressure_cap_bar, competition, notes, created_by_membership_id)
       VALUES (:clubId, :heldOn, :site, :cap, :competition, :notes, :by) RETURNING id`,
      { replacements: { clubId, heldOn: input.heldOn, site: input.site, cap: capBar(input), competition: input.competition, notes: input.notes, by: actor.membership.id }, type: QueryTypes.SELECT, transaction })
    await setStationsAndStaff(clubId, row!.id, input, transaction)
    await recordAudit(actor, clubId, { action: 'event.create', subjectType: 'launch_event', subjectId: row!.id, after: auditView({ ...input, pressureCapBar: capBar(input) }) }, transaction)
    return row!.id
  })
  return (await launchEventDetail(actor, id, now))!
}

interface RegisteredMember { membership_id: string, email: string, name: string }

/** The members registered for event `id` now (withdrawn ones left out). */
async function registeredMembers(id: string, transaction: Transaction): Promise<RegisteredMember[]> {
  return useDb().query<RegisteredMember>(
    `SELECT r.membership_id, u.email, u.name FROM launch_event_registrations r JOIN memberships m ON m.id = r.membership_id
       JOIN users u ON u.id = m.user_id WHERE r.event_id = :id AND r.withdrawn_at IS NULL`,
    { replacements: { id }, type: QueryTypes.SELECT, transaction })
}

/**
 * E-mails every member registered for event `eventId` (a safety kind: nobody opts out). One e-mail per
 * member, kind and subject on the club's today: a move is about the event and its new day, so moving
 * it twice to the same day sends one e-mail, and a cancellation is sent once.
 */
async function tellRegistered(actor: Actor, eventId: string, kind: NoticeKindName, subjectKey: string, vars: Record<string, string>, transaction: Transaction, now: Date): Promise<void> {
  for (const m of await registeredMembers(eventId, transaction)) {
    await enqueueNotice({
      clubId: actor.club.id, membershipId: m.membership_id, kind, subjectKey, dueOn: clubToday(actor.club, now), toEmail: m.email,
      vars: { clubName: actor.club.name, memberName: m.name, baseUrl: clubBaseUrl(actor.club), eventId, ...vars },
    }, transaction)
  }
}

/**
 * A safety officer or admin changes event `id` (audited before and after). A change of day is a move:
 * every registered member is e-mailed. Past and cancelled events are not changed (422); an event with
 * fills on record keeps its day. 404 when not the club's.
 */
export async function updateLaunchEvent(actor: Actor, id: string, input: LaunchEventInput, now = new Date()): Promise<LaunchEventDto> {
  const clubId = actor.club.id
  const today = clubToday(actor.club, now)
  await inTransaction(async (transaction) => {
    const locked = await lockLaunchEvent(clubId, id, transaction)
    if (!locked) notFound('No such event')
    const problem = eventChangeProblem({ heldOn: locked.held_on, cancelled: locked.cancelled_at !== null }, today)
    if (problem) refuse({ code: 'EVENT_CLOSED', message: problem })
    if (input.heldOn < today) refuse({ code: 'EVENT_IN_THE_PAST', message: 'An event is held today or later.' })
    await checkStationsAndStaff(clubId, input, transaction)
    const before = (await launchEventDetail(actor, id, now, transaction))!
    const moved = input.heldOn !== locked.held_on
    if (moved) {
      const [fills] = await useDb().query<{ n: number }>('SELECT count(*)::int AS n FROM fills WHERE event_id = :id', { replacements: { id }, type: QueryTypes.SELECT, transaction })
      if (fills!.n > 0) refuse({ code: 'EVENT_HAS_FILLS', message: 'Fills are on record for this event: it keeps its day. Create a new event instead.' })
    }
    await useDb().query(
      `UPDATE launch_events SET held_on = :heldOn, site = :site, pressure_cap_bar = :cap, competition = :competition, notes = :notes, updated_at = now()
        WHERE id = :id AND club_id = :clubId`,
      { replacements: { id, clubId, heldOn: input.heldOn, site: input.site, cap: capBar(input), competition: input.competition, notes: input.notes }, transaction })
    await setStationsAndStaff(clubId, id, input, transaction)
    await recordAudit(actor, clubId, {
      action: 'event.update', subjectType: 'launch_event', subjectId: id,
      before: auditView({ ...before, stationIds: before.stations.map(s => s.id), staffIds: before.staff.map(s => s.id) }),
      after: auditView({ ...input, pressureCapBar: capBar(input) }),
    }, transaction)
    if (moved) await tellRegistered(actor, id, 'launch_event_moved', `${id}:${input.heldOn}`, { eventSite: input.site, fromDate: locked.held_on, toDate: input.heldOn }, transaction, now)
  })
  kickNoticeQueue()
  return (await launchEventDetail(actor, id, now))!
}

/**
 * A safety officer or admin cancels event `id` with a reason (audited); every registered member is
 * e-mailed the reason. Past or already cancelled events: 422. 404 when not the club's.
 */
export async function cancelLaunchEvent(actor: Actor, id: string, reason: string, now = new Date()): Promise<LaunchEventDto> {
  const clubId = actor.club.id
  await inTransaction(async (transaction) => {
    const locked = await lockLaunchEvent(clubId, id, transaction)
    if (!locked) notFound('No such event')
    const problem = eventChangeProblem({ heldOn: locked.held_on, cancelled: locked.cancelled_at !== null }, clubToday(actor.club, now))
    if (problem) refuse({ code: 'EVENT_CLOSED', message: problem })
    const [row] = await useDb().query<{ site: string }>(
      'UPDATE launch_events SET cancelled_at = :now, cancel_reason = :reason, updated_at = now() WHERE id = :id AND club_id = :clubId RETURNING site',
      { replacements: { id, clubId, reason, now }, type: QueryTypes.SELECT, transaction })
    await recordAudit(actor, clubId, { action: 'event.cancel', subjectType: 'launch_event', subjectId: id, before: { cancelled: false }, after: { cancelled: true }, reason }, transaction)
    await tellRegistered(actor, id, 'launch_event_cancelled', id, { eventSite: row!.site, eventDate: locked.held_on, reasonText: reason }, transaction, now)
  })
  kickNoticeQueue()
  return (await launchEventDetail(actor, id, now))!
}
