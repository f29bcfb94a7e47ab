import { DeskQuerySchema, DeskTableParamSchema } from '#shared/schemas/audit-desk'
import { deskTableCsv } from '../../../../services/audit'

/** Every row of an audit desk table the filter selects, as a CSV download (audit.read). */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  const { table } = validParams(event, DeskTableParamSchema)
  const csv = await deskTableCsv(actor, table, validQuery(event, DeskQuerySchema))
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="audit-desk-${table}.csv"`)
  return csv
})
