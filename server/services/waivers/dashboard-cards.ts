import { QueryTypes } from 'sequelize'
import type { Card, CardProvider } from '../dashboard/provider'
import { statusPredicates } from '../members'

// The status function as SQL (its one copy), with this file's replacements.
const STATUS_SQL = statusPredicates({ today: ':today', graceDays: ':graceDays' })

async function count(sql: string, replacements: Record<string, unknown>): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(sql, { replacements, type: QueryTypes.SELECT })
  return row?.n ?? 0
}

/** policy.edit: the current waiver version and dues-current members who have not accepted it. */
async function waiverCardsFor(clubId: string, today: string, graceDays: number, currentVersion: number | null): Promise<Card[]> {
  const missing = currentVersion === null
    ? 0
    : await count(`
      SELECT count(*)::int AS n FROM memberships m
      WHERE m.club_id = :clubId AND ((${STATUS_SQL.active}) OR (${STATUS_SQL.grace}))
        AND NOT EXISTS (SELECT 1 FROM waiver_acceptances a JOIN waivers w ON w.id = a.waiver_id
          WHERE a.membership_id = m.id AND w.club_id = :clubId AND w.version = :version)`,
      { clubId, today, graceDays, version: currentVersion })
  return [
    { key: 'waiver-version', title: 'Waiver in force', value: currentVersion === null ? 'None' : `Version ${currentVersion}`, hint: currentVersion === null ? 'Publish the club\'s waiver.' : 'Publishing a new version asks everyone again.', to: '/waiver', tone: currentVersion === null ? 'attention' : 'neutral', group: 'safety' },
    { key: 'waiver-missing', title: 'Members without the current waiver', value: missing, hint: 'Active members and those in their grace period who have not accepted it.', to: '/waiver', tone: missing ? 'attention' : 'ok', group: 'safety' },
  ]
}

/** policy.edit: the waiver in force and who has not accepted it. */
export const waiverCards: CardProvider = {
  capability: 'policy.edit',
  cards: ({ actor, standing }) => waiverCardsFor(actor.club.id, standing.today, actor.club.graceDays, standing.member.waiver.currentVersion),
}
