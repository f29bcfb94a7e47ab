import { QueryTypes } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { lockVessel } from '../../utils/locks'
import type { ProofRequestDto } from '#shared/types/proof-tests'
import type { VesselDto } from '#shared/types/vessels'
import { proofDue, vesselTransition } from '#shared/utils/vessel-transitions'
import type { VesselConstruction } from '#shared/utils/vessel-arithmetic'
import type { VesselState } from '#shared/utils/vessel-states'
import { clubVesselRules } from './policy'
import { vesselDto } from './registry'
import { deriveProofStanding, loadProofFacts } from './standing'

/**
 * The owner asks for a proof test of vessel `vesselId` (another member's is 404): allowed while the
 * vessel awaits proof or its retest is due, refused with the transition table's reason otherwise.
 * Asking again keeps the first request's time.
 */
export async function requestProofTest(owner: Actor, vesselId: string): Promise<VesselDto> {
  return inTransaction(async (transaction) => {
    const vessel = await lockVessel(owner.club.id, vesselId, transaction)
    if (!vessel || vessel.ownerMembershipId !== owner.membership.id) notFound('No such vessel')
    const current = await vesselDto(vessel, transaction)
    const transition = vesselTransition(current.proof.effectiveState, { kind: 'proof', result: 'pass' })
    if (!transition.allowed) refuse(transition.reason)
    if (!vessel.proofRequestedAt) await vessel.update({ proofRequestedAt: new Date() }, { transaction })
    return vesselDto(vessel, transaction)
  })
}

interface RequestRow {
  id: string
  tag: string
  name: string
  construction: VesselConstruction
  state: VesselState
  last_layup_on: string | null
  proof_requested_at: Date
  owner_membership_id: string
  owner_name: string
}

/** Club `clubId`'s vessels whose owners asked for a proof test and may have one now, oldest request first. */
export async function listProofRequests(clubId: string): Promise<ProofRequestDto[]> {
  const rules = await clubVesselRules(clubId)
  if (!rules) return []
  const rows = await useDb().query<RequestRow>(
    `SELECT v.id, v.tag, v.name, v.construction, v.state, v.last_layup_on::text AS last_layup_on, v.proof_requested_at,
      v.owner_membership_id, u.name AS owner_name
    FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id JOIN users u ON u.id = m.user_id
    WHERE v.club_id = :clubId AND v.proof_requested_at IS NOT NULL AND v.state IN ('awaiting_proof', 'in_service')
    ORDER BY v.proof_requested_at, v.id LIMIT 500`,
    { replacements: { clubId }, type: QueryTypes.SELECT })
  const facts = await loadProofFacts(rows.map(r => r.id))
  return rows.flatMap((r) => {
    const standing = deriveProofStanding({
      state: r.state, construction: r.construction, lastLayupOn: r.last_layup_on, proofRequestedAt: r.proof_requested_at,
      ...(facts.get(r.id) ?? { lastPass: null, events: [], fillsSinceProof: 0 }),
    }, rules.policy, rules.today)
    if (!proofDue(standing.effectiveState)) return []
    return [{
      vesselId: r.id, tag: r.tag, name: r.name, construction: r.construction, effectiveState: standing.effectiveState,
      owner: { id: r.owner_membership_id, name: r.owner_name }, requestedAt: r.proof_requested_at.toISOString(),
      earliestProofOn: standing.earliestProofOn,
    }]
  })
}
