import { ImportJobParamSchema } from '#shared/schemas/club-data'
import { refusedRowsCsv } from '../../../services/club-data'

/** The dry run's refused rows as CSV, as written plus a reason column, to fix and import again (members.import). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'members.import')
  const { id } = validParams(event, ImportJobParamSchema)
  const csv = await refusedRowsCsv(actor, id)
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', 'attachment; filename="refused-rows.csv"')
  return csv
})
