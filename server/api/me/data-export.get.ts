import { myDataZip } from '../../services/club-data'

/** "Download my data": the signed-in member's records as a ZIP of JSON files and their vessels' photos, streamed. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const zip = await myDataZip(actor, await uploadsDir())
  setResponseHeader(event, 'content-type', 'application/zip')
  setResponseHeader(event, 'content-disposition', `attachment; filename="my-data-${new Date().toISOString().slice(0, 10)}.zip"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return sendStream(event, zip)
})
