import { QueryTypes, type Transaction } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { listPlans } from '../dues'
import { clubToday, homeClub } from '../clubs'
import { FRONT_DOOR_SECTIONS, type FrontDoor, type FrontDoorSection } from '#shared/schemas/club'
import type { FrontDoorSettingsDto, PublicFrontDoorDto } from '#shared/types/clubs'

/** How many training sessions and launch events the public page lists. */
const NEXT_COUNT = 3

interface FrontDoorRow {
  name: string
  description: string | null
  meets_where: string | null
  meets_when: string | null
  joining_note: string | null
  show_meetings: boolean | null
  show_joining: boolean | null
  show_dues: boolean | null
  show_training: boolean | null
  show_events: boolean | null
  show_calculator: boolean | null
  show_pass_check: boolean | null
}

const SHOW_COLUMNS: Record<FrontDoorSection, keyof FrontDoorRow> = {
  meetings: 'show_meetings', joining: 'show_joining', dues: 'show_dues', training: 'show_training',
  events: 'show_events', calculator: 'show_calculator', passCheck: 'show_pass_check',
}

/** The club's front-door settings; a club that never saved any gets empty texts and every section on. */
export async function frontDoorSettings(clubId: string, transaction?: Transaction): Promise<FrontDoorSettingsDto> {
  const [row] = await useDb().query<FrontDoorRow>(
    `SELECT c.name, f.description, f.meets_where, f.meets_when, f.joining_note, f.show_meetings, f.show_joining,
            f.show_dues, f.show_training, f.show_events, f.show_calculator, f.show_pass_check
       FROM clubs c LEFT JOIN club_front_doors f ON f.club_id = c.id WHERE c.id = :clubId`,
    { replacements: { clubId }, type: QueryTypes.SELECT, transaction })
  if (!row) notFound()
  return {
    name: row.name,
    description: row.description ?? '',
    meetsWhere: row.meets_where ?? '',
    meetsWhen: row.meets_when ?? '',
    joiningNote: row.joining_note ?? '',
    show: Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, row[SHOW_COLUMNS[s]] ?? true])) as FrontDoorSettingsDto['show'],
  }
}

/** The admin saves the front door: the club's name, the public texts and the section switches; audited. */
export async function updateFrontDoor(actor: Actor, input: FrontDoor): Promise<FrontDoorSettingsDto> {
  const clubId = actor.club.id
  return inTransaction(async (transaction) => {
    // The club row's lock serialises two admins saving at once, so each audit's "changed" is true.
    await useDb().query('SELECT id FROM clubs WHERE id = :clubId FOR UPDATE', { replacements: { clubId }, transaction })
    const before = await frontDoorSettings(clubId, transaction)
    await useDb().query('UPDATE clubs SET name = :name, updated_at = now() WHERE id = :clubId', { replacements: { clubId, name: input.name }, transaction })
    await useDb().query(
      `INSERT INTO club_front_doors (club_id, description, meets_where, meets_when, joining_note, show_meetings, show_joining,
         show_dues, show_training, show_events, show_calculator, show_pass_check, updated_at)
       VALUES (:clubId, :description, :meetsWhere, :meetsWhen, :joiningNote, :meetings, :joining, :dues, :training, :events,
         :calculator, :passCheck, now())
       ON CONFLICT (club_id) DO UPDATE SET description = EXCLUDED.description, meets_where = EXCLUDED.meets_where,
         meets_when = EXCLUDED.meets_when, joining_note = EXCLUDED.joining_note, show_meetings = EXCLUDED.show_meetings,
         show_joining = EXCLUDED.show_joining, show_dues = EXCLUDED.show_dues, show_training = EXCLUDED.show_training,
         show_events = EXCLUDED.show_events, show_calculator = EXCLUDED.show_calculator,
         show_pass_check = EXCLUDED.show_pass_check, updated_at = now()`,
      { replacements: { clubId, description: input.description, meetsWhere: input.meetsWhere, meetsWhen: input.meetsWhen, joiningNote: input.joiningNote, ...input.show }, transaction })
    const after = await frontDoorSettings(clubId, transaction)
    const changed = [
      ...(['name', 'description', 'meetsWhere', 'meetsWhen', 'joiningNote'] as const).filter(k => before[k] !== after[k]),
      ...FRONT_DOOR_SECTIONS.filter(s => before.show[s] !== after.show[s]).map(s => `show.${s}`),
    ]
    // Only the names of what changed: the texts are public anyway, and the trail stays short.
    await recordAudit(actor, clubId, { action: 'club.front_door', subjectType: 'club', subjectId: clubId, after: { changed } }, transaction)
    return after
  })
}

/**
 * The public page of the deployment's club (the one sign-ups join): its texts and the sections the
 * admin left on. Training sessions are those not yet started and not yet issued, with the spaces
 * left; launch events those from today on that are not cancelled. No query here reads a member.
 */
export async function publicFrontDoor(now = new Date()): Promise<PublicFrontDoorDto> {
  const club = await homeClub()
  const settings = await frontDoorSettings(club.id)
  const { show } = settings
  const page: PublicFrontDoorDto = { name: settings.name, description: settings.description, timeZone: club.timeZone }
  if (show.meetings && (settings.meetsWhere || settings.meetsWhen)) page.meetings = { where: settings.meetsWhere, when: settings.meetsWhen }
  if (show.joining) page.joining = { note: settings.joiningNote }
  if (show.dues) {
    page.dues = (await listPlans(club.id)).map(p => ({ name: p.name, audience: p.audience, priceMinor: p.priceMinor, currency: p.currency, periodMonths: p.periodMonths }))
  }
  if (show.training) page.training = await nextTrainingSessions(club.id, now)
  if (show.events) page.events = await nextLaunchEvents(club.id, clubToday(club, now))
  if (show.calculator) page.calculator = true
  if (show.passCheck) page.passCheck = true
  return page
}

/** The next training sessions open to enrol in, with the spaces left (never who took them). */
async function nextTrainingSessions(clubId: string, now: Date): Promise<NonNullable<PublicFrontDoorDto['training']>> {
  const rows = await useDb().query<{ id: string, course: string, starts_at: Date, ends_at: Date, place: string, spaces_left: number }>(
    `SELECT s.id, c.name AS course, s.starts_at, s.ends_at, s.place,
            greatest(s.capacity - (SELECT count(*)::int FROM training_enrolments e WHERE e.session_id = s.id AND e.status = 'enrolled'), 0) AS spaces_left
       FROM training_sessions s JOIN courses c ON c.id = s.course_id AND c.club_id = s.club_id
      WHERE s.club_id = :clubId AND s.starts_at > :now AND s.issued_at IS NULL
      ORDER BY s.starts_at, s.id LIMIT :limit`,
    { replacements: { clubId, now, limit: NEXT_COUNT }, type: QueryTypes.SELECT })
  return rows.map(r => ({ id: r.id, course: r.course, startsAt: new Date(r.starts_at).toISOString(), endsAt: new Date(r.ends_at).toISOString(), place: r.place, spacesLeft: Number(r.spaces_left) }))
}

/** The next launch events from `today` (the club's date) on that are not cancelled: day and site only. */
async function nextLaunchEvents(clubId: string, today: string): Promise<NonNullable<PublicFrontDoorDto['events']>> {
  const rows = await useDb().query<{ id: string, held_on: string, site: string, competition: boolean }>(
    `SELECT e.id, e.held_on::text AS held_on, e.site, e.competition FROM launch_events e
      WHERE e.club_id = :clubId AND e.held_on >= :today AND e.cancelled_at IS NULL
      ORDER BY e.held_on, e.created_at, e.id LIMIT :limit`,
    { replacements: { clubId, today, limit: NEXT_COUNT }, type: QueryTypes.SELECT })
  return rows.map(r => ({ id: r.id, heldOn: r.held_on, site: r.site, competition: r.competition }))
}
