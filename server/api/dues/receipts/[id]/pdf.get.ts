import { IdParamSchema } from '#shared/schemas/common'
import { receiptFor, receiptPdf } from '../../../../services/dues'

/** One receipt as a PDF download: the member's own, or any with dues.manage. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  const { id } = validParams(event, IdParamSchema)
  const receipt = await receiptFor(actor, id)
  setResponseHeader(event, 'content-type', 'application/pdf')
  setResponseHeader(event, 'content-disposition', `attachment; filename="receipt-${receipt.receiptLabel}.pdf"`)
  return receiptPdf(receipt)
})
