import { QueryTypes } from 'sequelize'
import type { Card, CardProvider } from '../dashboard/provider'

async function count(sql: string, replacements: Record<string, unknown>): Promise<number> {
  const [row] = await useDb().query<{ n: number }>(sql, { replacements, type: QueryTypes.SELECT })
  return row?.n ?? 0
}

/** audit.read: how many audit events the last 7 days brought. */
async function auditCard(clubId: string): Promise<Card> {
  const n = await count(`SELECT count(*)::int AS n FROM audit_events
    WHERE club_id = :clubId AND created_at > now() - interval '7 days'`, { clubId })
  return { key: 'audit-week', title: 'Audit events this week', value: n, hint: 'Privileged changes in the last 7 days.', to: '/audit', tone: 'neutral', group: 'audit' }
}

/** audit.read: this week's audit events. */
export const auditCards: CardProvider = { capability: 'audit.read', cards: async ({ actor }) => [await auditCard(actor.club.id)] }
