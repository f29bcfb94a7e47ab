import { EvidencePackQuerySchema } from '#shared/schemas/evidence-pack'
import { evidencePack } from '../../services/audit'

/** The club's evidence pack (evidence.export): a PDF of its safety records for a period, by default the last 12 months. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'evidence.export')
  const query = validQuery(event, EvidencePackQuerySchema)
  const { fileName, pdf } = await evidencePack(actor, query)
  setResponseHeader(event, 'content-type', 'application/pdf')
  setResponseHeader(event, 'content-disposition', `attachment; filename="${fileName}"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return pdf
})
