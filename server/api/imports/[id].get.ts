import { ImportJobParamSchema } from '#shared/schemas/club-data'
import { importJobDto, kickImportJobs } from '../../services/club-data'

/** An import job with its dry run and progress (members.import); a job whose server stopped is carried on. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const { id } = validParams(event, ImportJobParamSchema)
  const job = await importJobDto(actor, id)
  if (job.status === 'queued' || job.status === 'running') kickImportJobs()
  return job
})
