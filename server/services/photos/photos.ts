import { rename, rm } from 'node:fs/promises'
import { randomUUID } from 'node:crypto'
import { join } from 'node:path'
import { QueryTypes, ForeignKeyConstraintError } from 'sequelize'
import { fileTypeFromFile } from 'file-type'
import sharp from 'sharp'
import { Photo, Vessel } from '../../models'
import { PHOTO_CONTENT_TYPES, type PhotoContentType, type PhotoUploadFields } from '#shared/schemas/photo'
import type { PhotoDto } from '#shared/types/photos'

// One image at a time, no cache: a 2-core server keeps its memory for requests.
sharp.concurrency(1)
sharp.cache(false)

/** Who uploads or looks: their club, their membership, and the rights that widen what they see. */
export interface PhotoViewer {
  clubId: string
  membershipId: string
  /** vessels.read_all: sees (and adds build photos to) every vessel of the club. */
  readAll: boolean
  /** vessels.witness: adds gauge photos to any vessel of the club. */
  witness: boolean
  /** vessels.quarantine: the safety officer, who may remove any photo. */
  officer: boolean
  /** incidents.review or audit.read: sees every incident's photos (anyone else, their own reports'). */
  incidentsAll: boolean
}

/** The width of a thumbnail in pixels (never enlarged). */
export const THUMBNAIL_WIDTH_PX = 320
/** Pixels an image may have before it is decoded at all (a small file can declare a huge one). */
const MAX_INPUT_PIXELS = 50_000_000

const EXTENSIONS: Record<PhotoContentType, 'jpg' | 'png' | 'webp'> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp' }

/** The file name of a stored photo or its thumbnail: the id and the format, nothing from the client. */
export function photoFileName(photo: { id: string, contentType: PhotoContentType }, variant: 'full' | 'thumbnail' = 'full'): string {
  return `${photo.id}${variant === 'thumbnail' ? '-thumb' : ''}.${EXTENSIONS[photo.contentType]}`
}

function toPhotoDto(p: Photo): PhotoDto {
  return {
    id: p.id,
    purpose: p.purpose,
    vesselId: p.vesselId,
    contentType: p.contentType,
    width: p.width,
    height: p.height,
    byteSize: p.byteSize,
    caption: p.caption,
    createdAt: p.createdAt.toISOString(),
    url: `/api/photos/${p.id}`,
    thumbnailUrl: `/api/photos/${p.id}/thumbnail`,
  }
}

const forbidden = (message: string): never => {
  throw createError({ statusCode: 403, statusMessage: 'Forbidden', message })
}

/** The vessel `id` of the viewer's club if the viewer may see it (their own, or any with vessels.read_all), else null. */
async function visibleVessel(viewer: PhotoViewer, id: string): Promise<Vessel | null> {
  const vessel = await Vessel.findOne({ where: { id, clubId: viewer.clubId } })
  return vessel && (viewer.readAll || vessel.ownerMembershipId === viewer.membershipId) ? vessel : null
}

/** Whether incident `id` of the viewer's club is theirs to see: their own report, or any for the officers. */
async function visibleIncident(viewer: PhotoViewer, id: string): Promise<boolean> {
  const rows = await useDb().query('SELECT 1 FROM incidents WHERE id = :id AND club_id = :clubId AND (:all OR reported_by_membership_id = :me)',
    { replacements: { id, clubId: viewer.clubId, all: viewer.incidentsAll, me: viewer.membershipId }, type: QueryTypes.SELECT })
  return rows.length > 0
}

/**
 * Who may add which photo: a build photo, the vessel's owner or a vessels.read_all holder; a gauge
 * photo, the owner or a vessels.witness holder (who records the proof); a coupon photo, any member.
 * A vessel the uploader may not see is 404, as everywhere.
 */
async function checkMayAdd(viewer: PhotoViewer, fields: PhotoUploadFields): Promise<void> {
  if (fields.purpose === 'coupon') return
  if (fields.purpose === 'incident') {
    if (!(await visibleIncident(viewer, fields.incidentId!))) notFound('No such incident')
    return
  }
  const vessel = await visibleVessel(viewer, fields.vesselId!)
  if (!vessel) notFound('No such vessel')
  const owner = vessel.ownerMembershipId === viewer.membershipId
  if (fields.purpose === 'gauge' && !owner && !viewer.witness) forbidden('Only the owner or the witness adds a gauge photo (vessels.witness)')
}

/** The image type of a file judged from its first bytes, or a 415 naming what it seems to be. */
async function imageTypeOf(path: string): Promise<PhotoContentType> {
  const sniffed = await fileTypeFromFile(path)
  const mime = sniffed?.mime as PhotoContentType | undefined
  if (mime && PHOTO_CONTENT_TYPES.includes(mime)) return mime
  throw createError({
    statusCode: 415,
    statusMessage: 'Unsupported Media Type',
    message: `A photo must be a JPEG, PNG or WebP image; this file's content is ${sniffed ? `${sniffed.mime}` : 'not an image we know'}, whatever its name says`,
  })
}

/** Re-encodes `input` in its own format to `output`, turned upright by its EXIF orientation, with no metadata at all. */
async function reencode(input: string, output: string, type: PhotoContentType, widthPx?: number) {
  // sharp writes no EXIF, GPS, XMP, IPTC or ICC unless asked (withMetadata / keepExif …); rotate() applies the orientation first.
  let image = sharp(input, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' }).rotate()
  if (widthPx) image = image.resize({ width: widthPx, withoutEnlargement: true })
  image = type === 'image/jpeg' ? image.jpeg({ quality: 85 }) : type === 'image/png' ? image.png() : image.webp({ quality: 85 })
  return image.toFile(output)
}

/**
 * Keeps an uploaded image file (the temporary file at `uploadPath`, which the caller deletes) as a
 * photo: checks the uploader may add it, judges the type from the content (JPEG, PNG, WebP; 415
 * otherwise), re-encodes it and a thumbnail without metadata into the uploads folder `dir` under the
 * new photo's id (written under a temporary name, then renamed), and records the row. If anything fails
 * after the files are written, they are deleted again.
 */
export async function addPhoto(viewer: PhotoViewer, fields: PhotoUploadFields, uploadPath: string, dir: string): Promise<PhotoDto> {
  await checkMayAdd(viewer, fields)
  const contentType = await imageTypeOf(uploadPath)
  const id = randomUUID()
  const target = { id, contentType }
  const files = [join(dir, photoFileName(target)), join(dir, photoFileName(target, 'thumbnail'))] as const
  const parts = [`${files[0]}.part`, `${files[1]}.part`] as const
  try {
    let full: Awaited<ReturnType<typeof reencode>>
    try {
      full = await reencode(uploadPath, parts[0], contentType)
      await reencode(uploadPath, parts[1], contentType, THUMBNAIL_WIDTH_PX)
    }
    catch {
      refuse({ code: 'IMAGE_UNREADABLE', message: 'The image could not be read: it may be damaged, cut short or too large in pixels.' })
    }
    await rename(parts[0], files[0])
    await rename(parts[1], files[1])
    const photo = await inTransaction(transaction => Photo.create({
      id,
      clubId: viewer.clubId,
      vesselId: fields.purpose === 'coupon' || fields.purpose === 'incident' ? null : fields.vesselId,
      incidentId: fields.purpose === 'incident' ? fields.incidentId : null,
      uploadedByMembershipId: viewer.membershipId,
      purpose: fields.purpose,
      contentType,
      byteSize: full.size,
      width: full.width,
      height: full.height,
      caption: fields.caption ?? null,
    }, { transaction }))
    return toPhotoDto(photo)
  }
  catch (error) {
    await Promise.all([...files, ...parts].map(f => rm(f, { force: true })))
    throw error
  }
}

/**
 * Photo `id` if `viewer` may see it, else null: a vessel's photo for whoever may see the vessel (its
 * owner, or a vessels.read_all holder); a coupon photo for any member of the club.
 */
export async function findVisiblePhoto(viewer: PhotoViewer, id: string): Promise<Photo | null> {
  const photo = await Photo.findOne({ where: { id, clubId: viewer.clubId } })
  if (!photo) return null
  // An incident's photo is seen by whoever sees the incident (its reporter, the officers): never by vessel.
  if (photo.incidentId) return (await visibleIncident(viewer, photo.incidentId)) ? photo : null
  if (!photo.vesselId || viewer.readAll) return photo
  return (await visibleVessel(viewer, photo.vesselId)) ? photo : null
}

/** The photos of vessel `vesselId`, oldest first, or null when the viewer may not see the vessel (404). */
export async function listVesselPhotos(viewer: PhotoViewer, vesselId: string): Promise<PhotoDto[] | null> {
  if (!(await visibleVessel(viewer, vesselId))) return null
  const rows = await Photo.findAll({ where: { vesselId, clubId: viewer.clubId }, order: [['createdAt', 'ASC'], ['id', 'ASC']] })
  return rows.map(toPhotoDto)
}

/** The DTO of a photo row (for the routes that found it with findVisiblePhoto). */
export function photoDto(photo: Photo): PhotoDto {
  return toPhotoDto(photo)
}

/**
 * Removes photo `id` and its files: its uploader or the safety officer may, if they can see it. A photo
 * a proof or coupon test points at stays (the record's evidence): 422.
 */
export async function removePhoto(viewer: PhotoViewer, id: string, dir: string): Promise<void> {
  const photo = await findVisiblePhoto(viewer, id)
  if (!photo) notFound('No such photo')
  if (photo.uploadedByMembershipId !== viewer.membershipId && !viewer.officer) forbidden('Only the uploader or the safety officer removes a photo')
  try {
    await useDb().query('DELETE FROM photos WHERE id = $id AND club_id = $clubId', { bind: { id, clubId: viewer.clubId }, type: QueryTypes.DELETE })
  }
  catch (error) {
    if (error instanceof ForeignKeyConstraintError) refuse({ code: 'PHOTO_IN_RECORD', message: 'This photo belongs to a recorded test and stays with it.' })
    mapDbError(error)
  }
  await Promise.all((['full', 'thumbnail'] as const).map(v => rm(join(dir, photoFileName(photo, v)), { force: true })))
}
