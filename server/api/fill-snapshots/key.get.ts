import { snapshotKey } from '../../services/fills'

/**
 * The caller's club's public key for fill snapshots, as a JWK (ECDSA P-256): the fill page verifies
 * every snapshot it holds with it. Made on first need. Any member may read it; it is public.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return snapshotKey(actor)
})
