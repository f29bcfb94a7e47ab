import { EVIDENCE_MAX_BYTES, EvidenceUploadFieldsSchema } from '#shared/schemas/training'
import { addEvidence } from '../../../services/training'

/**
 * An instructor uploads evidence (multipart: `membershipId`, optional `recordId`, the file in `file`):
 * streamed to disk with a 10 MB limit, judged by its content (PDF, JPEG, PNG). 201 with the evidence.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  const dir = await uploadsDir()
  const upload = await receiveUpload(event, { dir, fileField: 'file', maxFileBytes: EVIDENCE_MAX_BYTES, what: 'evidence file' })
  try {
    const fields = validFields(upload.fields, EvidenceUploadFieldsSchema)
    if (!upload.file?.bytes) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: Choose a file to upload', data: { fields: { file: 'Choose a file to upload' } } })
    const evidence = await addEvidence(actor, fields, upload.file.path, dir, upload.file.bytes)
    setResponseStatus(event, 201)
    return evidence
  }
  finally {
    await discardUpload(upload)
  }
})
