import { FillPassTokenParamSchema } from '#shared/schemas/fill-passes'
import { refuseFillPass, verifyFillPass } from '../../services/tiers'

/**
 * A fill pass as anyone who scans it sees it, without signing in: name, valid tiers and whether the
 * membership is active. 404 for a forged or unknown token, 410 for a replaced or expired pass. Not
 * indexed (server/middleware/noindex.ts). One query; a guess cannot hit, as tokens are signed.
 */
export default defineEventHandler(async (event) => {
  const { token } = validParams(event, FillPassTokenParamSchema)
  const answer = await verifyFillPass(token)
  if (typeof answer === 'string') refuseFillPass(answer)
  setResponseHeader(event, 'cache-control', 'no-store')
  return answer
})
