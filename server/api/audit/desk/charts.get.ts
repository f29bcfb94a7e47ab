import { deskCharts } from '../../../services/audit'

/** The audit desk's charts (audit.read): expiries per week for 26 weeks, fills per event by tier. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'audit.read')
  return deskCharts(actor)
})
