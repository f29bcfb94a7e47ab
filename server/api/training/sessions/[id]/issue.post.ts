import { IdParamSchema } from '#shared/schemas/common'
import { IssueRecordsSchema } from '#shared/schemas/training'
import { issueSessionRecords } from '../../../../services/training'

/** The instructor issues the whole session's records in one step (confirmed); audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'training.run')
  await validBody(event, IssueRecordsSchema)
  const { id } = validParams(event, IdParamSchema)
  return issueSessionRecords(actor, id)
})
