import { rename, rm } from 'node:fs/promises'
import { randomUUID } from 'node:crypto'
import { join } from 'node:path'
import { QueryTypes } from 'sequelize'
import { fileTypeFromFile } from 'file-type'
import sharp from 'sharp'
import type { Actor } from '../../utils/auth'
import { EVIDENCE_CONTENT_TYPES, type EvidenceContentType, type EvidenceUploadFields } from '#shared/schemas/training'
import type { EvidenceDto } from '#shared/types/training'
import { toEvidenceDto } from './records'

const EXTENSIONS: Record<EvidenceContentType, 'pdf' | 'jpg' | 'png'> = { 'application/pdf': 'pdf', 'image/jpeg': 'jpg', 'image/png': 'png' }
/** Pixels an image may have before it is decoded at all (a small file can declare a huge one). */
const MAX_INPUT_PIXELS = 50_000_000

/** The file name of stored evidence: its id and format, nothing from the client. */
export function evidenceFileName(e: { id: string, contentType: EvidenceContentType }): string {
  return `evidence-${e.id}.${EXTENSIONS[e.contentType]}`
}

/** The evidence type of a file judged from its first bytes, or a 415 naming what it seems to be. */
async function evidenceTypeOf(path: string): Promise<EvidenceContentType> {
  const sniffed = await fileTypeFromFile(path)
  const mime = sniffed?.mime as EvidenceContentType | undefined
  if (mime && EVIDENCE_CONTENT_TYPES.includes(mime)) return mime
  throw createError({
    statusCode: 415,
    statusMessage: 'Unsupported Media Type',
    message: `Evidence must be a PDF, JPEG or PNG file; this file's content is ${sniffed ? sniffed.mime : 'not a type we know'}, whatever its name says`,
  })
}

/**
 * Keeps an uploaded evidence file (the temporary file at `uploadPath`, which the caller deletes) for
 * member `fields.membershipId` (training.run): its type judged from the content (PDF, JPEG, PNG; 415
 * otherwise); an image re-encoded in its own format without metadata, as photos are; a PDF kept byte
 * for byte (it is only ever served as a download). With `recordId` it joins that record of the member
 * at once; without, a course-taken-elsewhere record takes it up. Files are removed again on failure.
 */
export async function addEvidence(actor: Actor, fields: EvidenceUploadFields, uploadPath: string, dir: string, byteSize: number): Promise<EvidenceDto> {
  const [target] = await useDb().query<{ ok: boolean }>(
    `SELECT (:recordId::uuid IS NULL OR EXISTS (SELECT 1 FROM training_records r WHERE r.id = :recordId::uuid AND r.membership_id = m.id)) AS ok
       FROM memberships m WHERE m.id = :membershipId AND m.club_id = :clubId`,
    { replacements: { membershipId: fields.membershipId, recordId: fields.recordId ?? null, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!target?.ok) notFound('No such member or record')
  const contentType = await evidenceTypeOf(uploadPath)
  const id = randomUUID()
  const file = join(dir, evidenceFileName({ id, contentType }))
  const part = `${file}.part`
  try {
    let size = byteSize
    if (contentType === 'application/pdf') {
      await rename(uploadPath, part)
    }
    else {
      try {
        let image = sharp(uploadPath, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' }).rotate()
        image = contentType === 'image/jpeg' ? image.jpeg({ quality: 85 }) : image.png()
        size = (await image.toFile(part)).size
      }
      catch {
        refuse({ code: 'IMAGE_UNREADABLE', message: 'The image could not be read: it may be damaged, cut short or too large in pixels.' })
      }
    }
    await rename(part, file)
    const [row] = await useDb().query<Parameters<typeof toEvidenceDto>[0]>(
      `INSERT INTO training_evidence (id, club_id, membership_id, record_id, uploaded_by_membership_id, content_type, byte_size)
       VALUES (:id, :clubId, :membershipId, :recordId, :me, :contentType, :size)
       RETURNING id, membership_id, record_id, content_type, byte_size, created_at`,
      { replacements: { id, clubId: actor.club.id, membershipId: fields.membershipId, recordId: fields.recordId ?? null, me: actor.membership.id, contentType, size }, type: QueryTypes.SELECT })
    return toEvidenceDto(row!)
  }
  catch (error) {
    await Promise.all([file, part].map(f => rm(f, { force: true })))
    throw error
  }
}

/**
 * Evidence `id` if the actor may see it: the member it belongs to, or a holder of training.run or
 * training.flag; null otherwise (the route answers 404, as for a file that does not exist).
 */
export async function findVisibleEvidence(actor: Actor, id: string): Promise<{ id: string, contentType: EvidenceContentType } | null> {
  const [row] = await useDb().query<{ id: string, membership_id: string, content_type: EvidenceContentType }>(
    'SELECT id, membership_id, content_type FROM training_evidence WHERE id = :id AND club_id = :clubId',
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!row) return null
  const may = row.membership_id === actor.membership.id || actorCan(actor, 'training.run') || actorCan(actor, 'training.flag')
  return may ? { id: row.id, contentType: row.content_type } : null
}
