import { DeskQuerySchema, DeskTableParamSchema } from '#shared/schemas/audit-desk'
import { deskTablePage } from '../../../../services/audit'

/** Every row of an audit desk table the filter selects, as a CSV download (audit.read): its column keys, then the link. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  const { table } = validParams(event, DeskTableParamSchema)
  const page = await deskTablePage(actor, table, validQuery(event, DeskQuerySchema), { all: true })
  return sendCsv(event, `audit-desk-${table}.csv`, [...page.columns.map(c => c.key), 'link'],
    page.items.map(r => [...page.columns.map(c => r.cells[c.key] ?? null), r.link.to]))
})
