import { rename, rm } from 'node:fs/promises'
import { randomUUID } from 'node:crypto'
import { join } from 'node:path'
import { QueryTypes } from 'sequelize'
import { fileTypeFromFile } from 'file-type'
import sharp from 'sharp'
import type { Actor } from '../../utils/auth'
import { EVIDENCE_CONTENT_TYPES, type EvidenceContentType } from '#shared/schemas/training'

const EXTENSIONS: Record<EvidenceContentType, 'pdf' | 'jpg' | 'png'> = { 'application/pdf': 'pdf', 'image/jpeg': 'jpg', 'image/png': 'png' }
/** Pixels an image may have before it is decoded at all (a small file can declare a huge one). */
const MAX_INPUT_PIXELS = 50_000_000

/** The file name of a sign-off's stored evidence: its id and format, nothing from the client. */
export function tierEvidenceFileName(e: { id: string, contentType: EvidenceContentType }): string {
  return `tier-evidence-${e.id}.${EXTENSIONS[e.contentType]}`
}

/**
 * Keeps an evidence file (the temporary file at `uploadPath`, which the caller deletes) for sign-off
 * `signoffId` of the actor's club (tiers.grant): its type judged from the content (PDF, JPEG, PNG;
 * 415 otherwise), an image re-encoded without metadata, a PDF kept as it is (only ever downloaded).
 * 404 for a sign-off of another club. Files are removed again on failure.
 */
export async function addTierEvidence(actor: Actor, signoffId: string, uploadPath: string, dir: string, byteSize: number): Promise<{ id: string, contentType: EvidenceContentType }> {
  const [signoff] = await useDb().query<{ id: string }>('SELECT id FROM tier_signoffs WHERE id = :signoffId AND club_id = :clubId',
    { replacements: { signoffId, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!signoff) notFound('No such sign-off')
  const sniffed = await fileTypeFromFile(uploadPath)
  const contentType = sniffed?.mime as EvidenceContentType | undefined
  if (!contentType || !EVIDENCE_CONTENT_TYPES.includes(contentType)) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: `Evidence must be a PDF, JPEG or PNG file; this file's content is ${sniffed ? sniffed.mime : 'not a type we know'}` })
  }
  const id = randomUUID()
  const file = join(dir, tierEvidenceFileName({ id, contentType }))
  const part = `${file}.part`
  try {
    let size = byteSize
    if (contentType === 'application/pdf') await rename(uploadPath, part)
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
    await useDb().query(
      `INSERT INTO tier_evidence (id, club_id, signoff_id, uploaded_by_membership_id, content_type, byte_size)
       VALUES (:id, :clubId, :signoffId, :me, :contentType, :size)`,
      { replacements: { id, clubId: actor.club.id, signoffId, me: actor.membership.id, contentType, size } })
    return { id, contentType }
  }
  catch (error) {
    await Promise.all([file, part].map(f => rm(f, { force: true })))
    throw error
  }
}

/**
 * Sign-off evidence `id` if the actor may see it: the member it is about, or an officer who grants or
 * suspends tiers; null otherwise (the route answers 404, as for a file that does not exist).
 */
export async function findVisibleTierEvidence(actor: Actor, id: string): Promise<{ id: string, contentType: EvidenceContentType } | null> {
  const [row] = await useDb().query<{ id: string, membership_id: string, content_type: EvidenceContentType }>(
    `SELECT e.id, s.membership_id, e.content_type FROM tier_evidence e JOIN tier_signoffs s ON s.id = e.signoff_id
      WHERE e.id = :id AND e.club_id = :clubId`,
    { replacements: { id, clubId: actor.club.id }, type: QueryTypes.SELECT })
  if (!row) return null
  const may = row.membership_id === actor.membership.id || actorCan(actor, 'tiers.grant') || actorCan(actor, 'tiers.suspend')
  return may ? { id: row.id, contentType: row.content_type } : null
}
