import { IdParamSchema } from '#shared/schemas/common'
import { EVIDENCE_MAX_BYTES } from '#shared/schemas/training'
import { addTierEvidence } from '../../../../services/tiers'

/**
 * An assessor attaches evidence to a sign-off (tiers.grant; multipart, the file in `file`): streamed
 * to disk with a 10 MB limit, judged by its content (PDF, JPEG, PNG), kept private. 201 with its id.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'tiers.grant')
  const { id } = validParams(event, IdParamSchema)
  const dir = await uploadsDir()
  const upload = await receiveUpload(event, { dir, fileField: 'file', maxFileBytes: EVIDENCE_MAX_BYTES, what: 'evidence file' })
  try {
    if (!upload.file?.bytes) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: Choose a file to upload', data: { fields: { file: 'Choose a file to upload' } } })
    const evidence = await addTierEvidence(actor, id, upload.file.path, dir, upload.file.bytes)
    setResponseStatus(event, 201)
    return evidence
  }
  finally {
    await discardUpload(upload)
  }
})
