// The evidence pack: a PDF of the club's safety records for a period (evidence.export).
import type { Actor } from '../../../utils/auth'
import type { EvidencePackQuery } from '#shared/schemas/evidence-pack'
import { gatherEvidencePack } from './gather'
import { renderEvidencePack } from './render'

export type { EvidencePackData } from './gather'

/** The actor's club's evidence pack for `q`'s period as a PDF, with a file name naming the period. */
export async function evidencePack(actor: Actor, q: EvidencePackQuery): Promise<{ fileName: string, pdf: Buffer }> {
  const data = await gatherEvidencePack(actor.club.id, q)
  if (!data) notFound('No such club')
  return { fileName: `evidence-pack-${data.from}-to-${data.to}.pdf`, pdf: await renderEvidencePack(data) }
}
