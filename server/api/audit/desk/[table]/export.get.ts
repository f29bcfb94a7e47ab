import { DeskQuerySchema, DeskTableParamSchema } from '#shared/schemas/audit-desk'
import { deskTableCsv } from '../../../../services/audit'

/** Every row of an audit desk table the filter selects, as a CSV download (audit.read): its column keys, then the link. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  const { table } = validParams(event, DeskTableParamSchema)
  return sendCsvText(event, `audit-desk-${table}.csv`, await deskTableCsv(actor, table, validQuery(event, DeskQuerySchema)))
})
