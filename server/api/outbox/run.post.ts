import { runNoticeJob } from '../../services/notices'
import { recordAudit } from '../../services/audit'

// A request sends at most this many; a larger backlog goes on in the background.
const MAX_NOTICES_PER_REQUEST = 200

/**
 * Runs the notice job now for the admin's club (reminder scans, then the queue); returns the counts.
 * Audited: who sent the due e-mails and what the run did (or that it failed).
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'notices.manage')
  const audit = (after: Record<string, unknown>) =>
    recordAudit(actor, actor.club.id, { action: 'notice.run', subjectType: 'club', subjectId: actor.club.id, after })
  const run = await runNoticeJob({ clubId: actor.club.id, maxNotices: MAX_NOTICES_PER_REQUEST }).catch(async (error: unknown) => {
    await audit({ outcome: 'failed' })
    throw error
  })
  await audit({ outcome: 'done', ...run })
  return run
})
