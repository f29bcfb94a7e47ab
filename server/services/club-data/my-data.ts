import { createReadStream, existsSync } from 'node:fs'
import { join } from 'node:path'
import type { Readable } from 'node:stream'
import { QueryTypes } from 'sequelize'
import { ZipFile } from 'yazl'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { listPayments } from '../dues'
import { myFills } from '../events'
import { loadMemberDto } from '../members'
import { photoFileName } from '../photos'
import { memberTierStanding } from '../tiers'
import { memberRecords } from '../training'
import { listVessels } from '../vessels'

/** The files of "Download my data", in the order the README explains them. */
export const MY_DATA_FILES = {
  'account.json': 'Your account: your name, e-mail address, whether it is confirmed, when you signed up, your unit of pressure.',
  'membership.json': 'Your membership of the club: roles, status, paid-through date, birth date, phone, emergency contact, guardian (for juniors), the waiver you accepted.',
  'payments.json': 'Every payment of your dues: card, cash or bank transfer, pending, paid, failed or refunded, with its receipt number.',
  'training.json': 'Your training records: course, dates, trainer, result, expiry, and any call for retraining.',
  'tiers.json': 'The pressure tiers you hold or held, their state today, and the sign-offs behind them.',
  'vessels.json': 'The pressure vessels registered to you and their photos (the image files are in the photos folder, named by photo id).',
  'fills.json': 'Every fill recorded for you at a launch event, and every attempt the fill gate refused, with its reasons.',
  'bookings.json': 'Your workshop bookings, cancelled ones included.',
  'incidents.json': 'The incidents you reported, as you reported them. Other people involved are counted, not named; injury details are left out where they may concern someone else.',
  'notices.json': 'The e-mail notices the club sent (or queued) to you: subject, text, address and when.',
  'audit-events.json': 'The entries of the club\'s audit trail about you, your membership and your records: what was done, when, by whom and why.',
} as const

/** A photo file to put in the ZIP: where it lies in the uploads folder and its name in the ZIP. */
interface PhotoEntry { path: string, name: string }

const JSON_OPTIONS = { compress: true } as const

/** Pages through one of "my" paged lists until every item is read. */
async function everyPage<T>(list: (page: number) => Promise<{ items: T[], total: number }>): Promise<T[]> {
  const items: T[] = []
  for (let page = 1; ; page++) {
    const got = await list(page)
    items.push(...got.items)
    if (!got.items.length || items.length >= got.total) return items
  }
}

/**
 * Everything the club keeps about the signed-in member, one plain object per file of the ZIP, each
 * read with the member's own id in its WHERE clause (never another member's personal data: people
 * named on the member's records appear only in their role on that record — trainer, assessor,
 * officer — and an incident's other people only as a count). Also the photo files of their vessels.
 */
export async function collectMyData(actor: Actor, uploads: string): Promise<{ files: Record<keyof typeof MY_DATA_FILES, unknown>, photos: PhotoEntry[] }> {
  const db = useDb()
  const me = actor.membership.id
  const clubId = actor.club.id
  const replacements = { me, clubId, userId: actor.user.id }
  const member = await loadMemberDto(clubId, me)
  if (!member) notFound('No such member')
  const { name, email, emailVerified, unitPreference, ...membership } = member
  const [user] = await db.query<{ created_at: Date }>('SELECT created_at FROM users WHERE id = :userId', { replacements, type: QueryTypes.SELECT })

  const payments = (await listPayments(actor, { sort: 'createdAt', dir: 'desc', page: 1, pageSize: 100, membershipId: me }, { all: true })).items
  const vesselList = await everyPage(page => listVessels({ clubId, membershipId: me, readAll: false }, { sort: 'tag', dir: 'asc', page, pageSize: 100 }))
  const photoRows = vesselList.length
    ? await db.query<{ id: string, vessel_id: string, purpose: string, content_type: 'image/jpeg' | 'image/png' | 'image/webp', caption: string | null, width: number, height: number, created_at: Date }>(
        `SELECT p.id, p.vessel_id, p.purpose, p.content_type, p.caption, p.width, p.height, p.created_at FROM photos p
          WHERE p.club_id = :clubId AND p.vessel_id IN (:ids) AND p.purpose IN ('build', 'gauge') ORDER BY p.created_at, p.id`,
        { replacements: { ...replacements, ids: vesselList.map(v => v.id) }, type: QueryTypes.SELECT })
    : []
  const photos: PhotoEntry[] = []
  const vessels = vesselList.map(v => ({
    ...v,
    photos: photoRows.filter(p => p.vessel_id === v.id).map((p) => {
      const file = photoFileName({ id: p.id, contentType: p.content_type })
      const path = join(uploads, file)
      const inZip = existsSync(path) ? `photos/${file}` : null
      if (inZip) photos.push({ path, name: inZip })
      return { id: p.id, purpose: p.purpose, contentType: p.content_type, caption: p.caption, widthPx: p.width, heightPx: p.height, addedAt: new Date(p.created_at).toISOString(), file: inZip }
    }),
  }))

  const bookings = await db.query(
    `SELECT b.id, s.name AS station, b.starts_at AS "startsAt", b.ends_at AS "endsAt", b.note, b.created_at AS "bookedAt",
            b.cancelled_at AS "cancelledAt", b.cancel_reason AS "cancelReason"
       FROM bookings b JOIN stations s ON s.id = b.station_id
      WHERE b.membership_id = :me AND b.club_id = :clubId ORDER BY b.starts_at DESC, b.id`, { replacements, type: QueryTypes.SELECT })

  // What the member reported, as they reported it. Others involved are only counted; injury details
  // are given only when nobody but the member is named as involved (they may describe someone else's injury).
  const incidents = (await db.query<Record<string, unknown> & { others: number, injuryDetails: string | null }>(
    `SELECT i.id, i.kind, i.happened_at AS "happenedAt", i.place, e.site AS "eventSite", v.tag AS "vesselTag", i.what_happened AS "whatHappened",
            i.injury_details AS "injuryDetails", i.status, i.created_at AS "reportedAt", i.closed_at AS "closedAt",
            (SELECT count(*) FROM incident_people p WHERE p.incident_id = i.id AND p.membership_id <> :me)::int AS others,
            EXISTS (SELECT 1 FROM incident_people p WHERE p.incident_id = i.id AND p.membership_id = :me) AS "youWereInvolved"
       FROM incidents i LEFT JOIN launch_events e ON e.id = i.event_id LEFT JOIN vessels v ON v.id = i.vessel_id
      WHERE i.reported_by_membership_id = :me AND i.club_id = :clubId ORDER BY i.happened_at DESC, i.id`, { replacements, type: QueryTypes.SELECT }))
    .map(({ others, injuryDetails, ...i }) => ({
      ...i,
      otherPeopleInvolved: others,
      injuryDetails: others > 0 && injuryDetails !== null ? '(left out: it may concern other people involved)' : injuryDetails,
    }))

  const notices = await db.query(
    `SELECT n.id, n.kind, n.due_on::text AS "dueOn", n.to_email AS "toEmail", n.subject, n.text_body AS "text", n.status,
            n.sent_at AS "sentAt", n.created_at AS "queuedAt"
       FROM notices n WHERE n.membership_id = :me AND n.club_id = :clubId ORDER BY n.created_at DESC, n.id`, { replacements, type: QueryTypes.SELECT })

  // Entries whose subject is the member, their account or one of their own records.
  const auditEvents = await db.query(
    `SELECT a.id, a.created_at AS "at", a.action, a.subject_type AS "subjectType", a.subject_id AS "subjectId",
            CASE WHEN a.actor_membership_id = :me THEN 'you' ELSE coalesce(au.name, a.actor_name, 'the system') END AS "by",
            a.before, a.after, a.reason
       FROM audit_events a
       LEFT JOIN memberships am ON am.id = a.actor_membership_id LEFT JOIN users au ON au.id = am.user_id
      WHERE a.club_id = :clubId AND (
            (a.subject_type = 'membership' AND a.subject_id = :me)
         OR (a.subject_type = 'user' AND a.subject_id = :userId)
         OR (a.subject_type = 'vessel' AND a.subject_id IN (SELECT id FROM vessels WHERE owner_membership_id = :me))
         OR (a.subject_type = 'payment' AND a.subject_id IN (SELECT id FROM payments WHERE membership_id = :me))
         OR (a.subject_type = 'training_record' AND a.subject_id IN (SELECT id FROM training_records WHERE membership_id = :me))
         OR (a.subject_type = 'booking' AND a.subject_id IN (SELECT id FROM bookings WHERE membership_id = :me)))
      ORDER BY a.created_at DESC, a.id`, { replacements, type: QueryTypes.SELECT })

  return {
    files: {
      'account.json': { name, email, emailConfirmed: emailVerified, signedUpAt: user ? new Date(user.created_at).toISOString() : null, unitPreference },
      'membership.json': { club: actor.club.name, ...membership },
      'payments.json': payments,
      'training.json': await memberRecords(clubId, me),
      'tiers.json': await memberTierStanding(clubId, me, clubToday(actor.club)),
      'vessels.json': vessels,
      'fills.json': await everyPage(page => myFills(actor, { page, pageSize: 100 })),
      'bookings.json': bookings,
      'incidents.json': incidents,
      'notices.json': notices,
      'audit-events.json': auditEvents,
    },
    photos,
  }
}

/** README.txt of the ZIP: what each file holds. */
export function myDataReadme(clubName: string, memberName: string, madeAt: Date): string {
  const lines = [
    `Your data at ${clubName}, as kept by Hoopwise for ${memberName}, taken ${madeAt.toISOString()}.`,
    '',
    'Each .json file is plain JSON (UTF-8) that any program can read. Dates are ISO 8601 (times in UTC).',
    'People named on your records appear only in their role there (trainer, assessor, officer).',
    '',
    ...Object.entries(MY_DATA_FILES).map(([file, meaning]) => `${file}\n  ${meaning}`),
    'photos/',
    '  The image files of your vessels\' photos.',
    '',
  ]
  return lines.join('\r\n')
}

/**
 * "Download my data": a ZIP streamed as it is written, with README.txt, one JSON file per kind of
 * record and the photos of the member's vessels (read from the uploads folder `uploads`).
 */
export async function myDataZip(actor: Actor, uploads: string, now = new Date()): Promise<Readable> {
  const { files, photos } = await collectMyData(actor, uploads)
  const zip = new ZipFile()
  zip.addBuffer(Buffer.from(myDataReadme(actor.club.name, actor.user.name, now)), 'README.txt', { mtime: now, ...JSON_OPTIONS })
  for (const [name, value] of Object.entries(files)) {
    zip.addBuffer(Buffer.from(JSON.stringify(value, null, 2)), name, { mtime: now, ...JSON_OPTIONS })
  }
  // Images are already compressed: stored as they are.
  for (const p of photos) zip.addReadStream(createReadStream(p.path), p.name, { mtime: now, compress: false })
  zip.end()
  return zip.outputStream as Readable
}
