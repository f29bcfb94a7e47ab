import { ImportJobParamSchema, ImportRunSchema } from '#shared/schemas/club-data'
import { importJobDto, kickImportJobs, startImport } from '../../../services/club-data'

/** Starts a checked import (members.import): it runs as a job; the page follows its progress. 202. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const { id } = validParams(event, ImportJobParamSchema)
  await validBody(event, ImportRunSchema)
  await startImport(actor, id)
  kickImportJobs()
  setResponseStatus(event, 202)
  return importJobDto(actor, id)
})
