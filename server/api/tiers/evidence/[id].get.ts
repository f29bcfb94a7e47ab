import { createReadStream } from 'node:fs'
import { join } from 'node:path'
import { IdParamSchema } from '#shared/schemas/common'
import { findVisibleTierEvidence, tierEvidenceFileName } from '../../../services/tiers'

/**
 * A sign-off's evidence file, for the member it is about and the officers who grant or suspend tiers;
 * 404 to anyone else. A PDF always downloads; nothing is sniffed into another type; never cached.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const evidence = await findVisibleTierEvidence(actor, id)
  if (!evidence) notFound('No such evidence')
  const name = tierEvidenceFileName(evidence)
  setResponseHeaders(event, {
    'content-type': evidence.contentType,
    'content-disposition': `${evidence.contentType === 'application/pdf' ? 'attachment' : 'inline'}; filename="${name}"`,
    'x-content-type-options': 'nosniff',
    'content-security-policy': 'sandbox; default-src \'none\'',
    'cache-control': 'private, no-store',
  })
  return sendStream(event, createReadStream(join(await uploadsDir(), name)))
})
