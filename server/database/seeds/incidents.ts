import { QueryTypes } from 'sequelize'
import type { SeedContext } from './context'

const MEMBER = 'member@hoopwise.example'
const SAFETY = 'safety@hoopwise.example'
const PLACE = 'Saltings north flat, pad 2'

/**
 * One closed near miss the demo member reported, reviewed and closed by the safety officer. It names
 * no vessel and no people, so no demo vessel is held and no tier renewal waits on it.
 */
export async function seedIncidents(ctx: SeedContext): Promise<void> {
  const { sequelize, transaction, clubId } = ctx
  const reporter = ctx.memberIds.get(MEMBER)
  const officer = ctx.memberIds.get(SAFETY)
  if (!clubId || !reporter || !officer) return
  const found = await sequelize.query('SELECT id FROM incidents WHERE club_id = :clubId AND reported_by_membership_id = :reporter AND place = :place',
    { replacements: { clubId, reporter, place: PLACE }, type: QueryTypes.SELECT, transaction })
  if (found.length) return
  await sequelize.query(
    `INSERT INTO incidents (club_id, reported_by_membership_id, kind, happened_at, place, what_happened, status, review_notes, findings, actions, closed_at, closed_by_membership_id)
     VALUES (:clubId, :reporter, 'near_miss', (:today::date - 40) + time '11:20', :place,
       'A spectator walked toward the pad while the rocket was under pressure; the launch was held until the range was clear.',
       'closed', 'Spoke to the range officer of the day.', 'The spectator line had no rope on the estuary side.',
       'Rope and stakes added to the kit list for every launch event.', (:today::date - 38) + time '18:00', :officer)`,
    { replacements: { clubId, reporter, officer, place: PLACE, today: ctx.today }, transaction })
}
