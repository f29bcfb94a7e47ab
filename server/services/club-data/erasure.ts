import { QueryTypes, type Transaction } from 'sequelize'
import { membershipStatus, statusKeepsRights } from '#shared/utils/membership-status'
import { rolesCan } from '#shared/utils/permissions'
import { scrubText } from '#shared/utils/pseudonym'
import type { ErasureDto } from '#shared/types/erasure'
import type { EraseMember } from '#shared/schemas/erasure'
import type { Actor } from '../../utils/auth'
import { eraseInDatabase, erasureTarget, removeFilesOf, type ErasureTarget } from '../../database/erasures'
import { recordAudit } from '../audit'
import { usePayments } from '../dues'

const NAME_MISMATCH = { code: 'ERASE_NAME_MISMATCH', message: 'The name typed does not match the member\'s name: nothing was erased.' }
const SELF = { code: 'ERASE_SELF', message: 'You cannot erase your own membership; another admin can.' }
const ALREADY = { code: 'ALREADY_ERASED', message: 'This member was erased already.' }
const OTHER_CLUBS = { code: 'ERASE_OTHER_CLUBS', message: 'This account belongs to another club as well: each club erases its own membership, and the account goes with the last one.' }

const sameName = (a: string, b: string) => a.trim().toLocaleLowerCase() === b.trim().toLocaleLowerCase()

/**
 * 404 unless `id` is a membership of the actor's club; 422 for one's own, one already erased, an
 * account that belongs to another club too, or a typed name that is not the member's. Reads only.
 */
async function checkErasable(actor: Actor, id: string, confirmName: string, transaction?: Transaction): Promise<ErasureTarget> {
  const db = useDb()
  const target = await erasureTarget(db, id.toLowerCase(), transaction)
  if (!target || target.clubId !== actor.club.id) notFound('No such member')
  if (target.membershipId === actor.membership.id) refuse(SELF)
  const [row] = await db.query<{ name: string, erased: boolean, other_clubs: number }>(
    `SELECT u.name, EXISTS (SELECT 1 FROM erasures e WHERE e.membership_id = :id) AS erased,
            (SELECT count(*)::int FROM memberships o WHERE o.user_id = u.id AND o.id <> :id) AS other_clubs
       FROM users u WHERE u.id = :userId`,
    { replacements: { id: target.membershipId, userId: target.userId }, type: QueryTypes.SELECT, transaction })
  if (row!.erased) refuse(ALREADY)
  if (row!.other_clubs > 0) refuse(OTHER_CLUBS)
  if (!sameName(row!.name, confirmName)) refuse(NAME_MISMATCH)
  return target
}

/** Deletes the payment service's customer records of membership `id` (one already gone counts as deleted). */
async function deletePaymentCustomers(id: string): Promise<number> {
  const rows = await useDb().query<{ customer: string }>(
    `SELECT DISTINCT provider_customer_id AS customer FROM payments WHERE membership_id = :id AND provider_customer_id IS NOT NULL`,
    { replacements: { id }, type: QueryTypes.SELECT })
  if (!rows.length) return 0
  const payments = usePayments()
  for (const { customer } of rows) {
    try {
      await payments.customers.del(customer)
    }
    catch (error) {
      if ((error as { code?: string }).code !== 'resource_missing') throw error
    }
  }
  return rows.length
}

/**
 * Erases member `id` of the actor's club on their request (members.manage; `input.confirmName` must be
 * their name): the payment service's customer record deleted first (through the SDK), then in one
 * transaction every step of server/database/erasures.ts — personal fields removed or replaced by a
 * pseudonym, the membership resigned, the account unable to sign in, the member put on the erasure
 * list — and the audit event, whose reason keeps no name, e-mail or phone of theirs. Personal files
 * leave the uploads folder after commit. Payments, fills, proof tests, tier sign-offs and incidents stay.
 */
export async function eraseMember(actor: Actor, id: string, input: EraseMember, uploadsDir: string): Promise<ErasureDto> {
  const first = await checkErasable(actor, id, input.confirmName)
  const customers = await deletePaymentCustomers(first.membershipId)
  const { target, fileIds } = await inTransaction(async (transaction) => {
    const rows = await lockMemberships([actor.membership.id, first.membershipId], transaction, actor.club.id)
    const self = rows.get(actor.membership.id)
    const selfStatus = self && membershipStatus(self, { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays })
    if (!self || !selfStatus || !statusKeepsRights(selfStatus) || !rolesCan(self.roles, 'members.manage')) {
      throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'You do not have the right to do this (members.manage)' })
    }
    await lockUser(first.userId, transaction)
    // Checked again on the locked rows: a rename or a second erasure in between counts.
    const target = await checkErasable(actor, id, input.confirmName, transaction)
    const before = rows.get(target.membershipId)!
    const status = membershipStatus(before, { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays })
    const outcome = await eraseInDatabase(useDb(), target, transaction)
    await recordAudit(actor, actor.club.id, {
      action: 'member.erase',
      subjectType: 'membership',
      subjectId: target.membershipId,
      before: { status },
      after: { status: 'resigned', paymentCustomersDeleted: customers, personalUploads: outcome.fileIds.length },
      reason: scrubText(input.reason, target.needles, target.pseudonym),
    }, transaction)
    return { target, fileIds: outcome.fileIds }
  })
  const filesRemoved = await removeFilesOf(uploadsDir, fileIds)
  return { membershipId: target.membershipId, pseudonym: target.pseudonym, paymentCustomersDeleted: customers, filesRemoved }
}
