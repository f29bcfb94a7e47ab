import { DeskQuerySchema, DeskTableParamSchema } from '#shared/schemas/audit-desk'
import { deskTablePage } from '../../../../services/audit'

/** One page of an audit desk table (audit.read), sorted, filtered and paged by the server. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  const { table } = validParams(event, DeskTableParamSchema)
  return deskTablePage(actor, table, validQuery(event, DeskQuerySchema))
})
