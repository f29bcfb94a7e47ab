import type { PhotoContentType, PhotoPurpose } from '../schemas/photo'

/** A stored photo as the routes return it: what was kept (re-encoded, metadata stripped) and where to fetch it. */
export interface PhotoDto {
  id: string
  purpose: PhotoPurpose
  vesselId: string | null
  contentType: PhotoContentType
  width: number
  height: number
  byteSize: number
  caption: string | null
  createdAt: string
  /** The image, served only to members who may see it. */
  url: string
  /** A copy at most 320 px wide for galleries. */
  thumbnailUrl: string
}
