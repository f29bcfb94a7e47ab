import { createReadStream } from 'node:fs'
import { join } from 'node:path'
import { IdParamSchema } from '#shared/schemas/common'
import { evidenceFileName, findVisibleEvidence } from '../../../services/training'

/**
 * An evidence file, for the member it belongs to, instructors and safety officers; 404 to anyone
 * else. A PDF always downloads (attachment); nothing is sniffed into another type; never shared caches.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const evidence = await findVisibleEvidence(actor, id)
  if (!evidence) notFound('No such evidence')
  const name = evidenceFileName(evidence)
  setResponseHeaders(event, {
    'content-type': evidence.contentType,
    'content-disposition': `${evidence.contentType === 'application/pdf' ? 'attachment' : 'inline'}; filename="${name}"`,
    'x-content-type-options': 'nosniff',
    'content-security-policy': 'sandbox; default-src \'none\'',
    'cache-control': 'private, no-store',
  })
  return sendStream(event, createReadStream(join(await uploadsDir(), name)))
})
