import QRCode from 'qrcode'
import { Club } from '../../models'
import { clubBaseUrl } from '../clubs'
import { getVessel, type VesselViewer } from './registry'
import type { VesselLabelDto } from '#shared/types/vessels'

/**
 * How the label's QR code is drawn: error correction M (15 % of the code may be scuffed or dirty and it
 * still reads, at a size a 62 mm label holds) and no quiet zone of its own (the label's padding is one).
 */
export const VESSEL_LABEL_QR_OPTIONS = { type: 'svg', errorCorrectionLevel: 'M', margin: 0 } as const

/** The address of a vessel's page on the club's public address, the one its e-mails use. */
export function vesselPageUrl(club: Pick<Club, 'publicUrl'>, tag: string): string {
  return `${clubBaseUrl(club)}/vessels/${encodeURIComponent(tag)}`
}

/**
 * The printable label of vessel `id` as `viewer` may see it (null otherwise, like `getVessel`): tag,
 * name, owner, construction, rated fill and a QR code (SVG) of the vessel's page on the club's public
 * address, never the address the request came in on.
 */
export async function vesselLabel(viewer: VesselViewer, id: string): Promise<VesselLabelDto | null> {
  const vessel = await getVessel(viewer, id)
  if (!vessel) return null
  const club = await Club.findByPk(viewer.clubId, { attributes: ['publicUrl'] })
  if (!club) return null
  const pageUrl = vesselPageUrl(club, vessel.tag)
  return {
    id: vessel.id,
    tag: vessel.tag,
    name: vessel.name,
    construction: vessel.construction,
    ownerName: vessel.owner.name,
    ratedFillBar: vessel.proof.ratedFillBar,
    pageUrl,
    qrSvg: await QRCode.toString(pageUrl, VESSEL_LABEL_QR_OPTIONS),
  }
}
