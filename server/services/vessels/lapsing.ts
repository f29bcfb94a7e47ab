import { QueryTypes } from 'sequelize'
import { addCalendarDays } from '#shared/utils/dates'
import type { VesselConstruction } from '#shared/utils/vessel-arithmetic'
import { clubVesselRules } from './policy'
import { LAPSING_WITHIN_DAYS } from './registry'
import { deriveProofStanding, loadProofFacts } from './standing'

/** An in-service vessel whose proof runs out soon, with its owner's address for the notice. */
export interface LapsingProof {
  vesselId: string
  tag: string
  name: string
  ownerMembershipId: string
  ownerName: string
  ownerEmail: string
  /** The last day the proof is current (inclusive). */
  validThroughOn: string
  ratedFillBar: number
}

/**
 * Club `clubId`'s in-service vessels whose proof stands today but is current only through the next
 * 30 days, owned by members who are neither suspended nor resigned. The same standing the vessel page
 * shows (policy interval, fills since the proof, events) decides, not a second copy of the rule.
 */
export async function proofsLapsingSoon(clubId: string, now = new Date()): Promise<{ today: string, proofs: LapsingProof[] }> {
  const rules = await clubVesselRules(clubId, undefined, now)
  if (!rules) return { today: '', proofs: [] }
  const rows = await useDb().query<{ id: string, tag: string, name: string, construction: VesselConstruction, owner_membership_id: string, owner_name: string, owner_email: string }>(
    `SELECT v.id, v.tag, v.name, v.construction, v.owner_membership_id, u.name AS owner_name, u.email AS owner_email
    FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id JOIN users u ON u.id = m.user_id
    WHERE v.club_id = :clubId AND v.state = 'in_service' AND m.suspended_at IS NULL AND m.resigned_at IS NULL
    ORDER BY v.number`,
    { replacements: { clubId }, type: QueryTypes.SELECT })
  const facts = await loadProofFacts(rows.map(r => r.id))
  const until = addCalendarDays(rules.today, LAPSING_WITHIN_DAYS)
  const proofs = rows.flatMap((r) => {
    const f = facts.get(r.id)
    if (!f?.lastPass) return []
    const s = deriveProofStanding({ state: 'in_service', construction: r.construction, lastLayupOn: null, proofRequestedAt: null, ...f }, rules.policy, rules.today)
    if (s.effectiveState !== 'in_service' || !s.validThroughOn || s.validThroughOn > until) return []
    return [{
      vesselId: r.id, tag: r.tag, name: r.name, ownerMembershipId: r.owner_membership_id, ownerName: r.owner_name,
      ownerEmail: r.owner_email, validThroughOn: s.validThroughOn, ratedFillBar: s.ratedFillBar!,
    }]
  })
  return { today: rules.today, proofs }
}
