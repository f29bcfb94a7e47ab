import { IMPORT_MAX_BYTES } from '#shared/schemas/club-data'
import { createImportJob } from '../../services/club-data'

/**
 * An admin uploads a roster (multipart, the CSV file in `file`): streamed to a private file with a
 * 20 MB limit, its headings and first rows read for the mapping step. 201 with the import job.
 */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const dir = await uploadsDir()
  const upload = await receiveUpload(event, { dir, fileField: 'file', maxFileBytes: IMPORT_MAX_BYTES, maxFields: 2, what: 'roster file' })
  try {
    if (!upload.file?.bytes) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'file: Choose a CSV file to upload', data: { fields: { file: 'Choose a CSV file to upload' } } })
    const job = await createImportJob(actor, upload.file.path, dir, upload.file.bytes)
    setResponseStatus(event, 201)
    return job
  }
  finally {
    await discardUpload(upload)
  }
})
