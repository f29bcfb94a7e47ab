import { QueryTypes } from 'sequelize'
import type { Card, CardProvider } from '../dashboard/provider'

/** notices.manage: queued and failed e-mails. */
async function noticeCards(clubId: string): Promise<Card[]> {
  const rows = await useDb().query<{ status: string, n: number }>(`
    SELECT status, count(*)::int AS n FROM notices WHERE club_id = :clubId AND status IN ('queued', 'sending', 'failed')
    GROUP BY status`, { replacements: { clubId }, type: QueryTypes.SELECT })
  const n = (s: string) => rows.find(r => r.status === s)?.n ?? 0
  const waiting = n('queued') + n('sending')
  return [
    { key: 'notices-queued', title: 'E-mails waiting to go', value: waiting, hint: 'Queued notices the next run sends.', to: '/outbox?status=queued', tone: 'neutral', group: 'office' },
    { key: 'notices-failed', title: 'E-mails that failed', value: n('failed'), hint: n('failed') ? 'Check the address or the mail server.' : 'None failed.', to: '/outbox?status=failed', tone: n('failed') ? 'attention' : 'ok', group: 'office' },
  ]
}

/** notices.manage: the outbox's queued and failed e-mails. */
export const outboxCards: CardProvider = { capability: 'notices.manage', cards: ({ actor }) => noticeCards(actor.club.id) }
