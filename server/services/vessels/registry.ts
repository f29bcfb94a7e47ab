import { containsPattern } from '../../utils/like-pattern'
import { QueryTypes } from 'sequelize'
import { Vessel } from '../../models'
import type { VesselListQuery, VesselRegistration } from '#shared/schemas/vessel'
import type { VesselDto, VesselListItemDto, VesselProofStandingDto } from '#shared/types/vessels'
import type { Paged } from '#shared/types/common'
import { vesselTag } from '#shared/utils/vessel-states'
import { addCalendarDays } from '#shared/utils/dates'
import type { Transaction } from 'sequelize'
import { clubVesselRules, policyFillLimit, policyIntervalMonths } from './policy'
import { deriveProofStanding, loadProofFacts } from './standing'
import { PROOF_INVALIDATING_EVENTS, VESSEL_CONSTRUCTIONS } from '#shared/utils/vessel-arithmetic'

/** Who is looking at vessels: their club, their membership, and whether they see every member's. */
export interface VesselViewer {
  clubId: string
  membershipId: string
  readAll: boolean
}

/** The registering member, as the service needs them. */
export interface VesselOwner {
  clubId: string
  membershipId: string
  name: string
}

const num = (v: string | number | null): number | null => (v === null ? null : Number(v))

/** A vessel's DTO from its row, its owner's name and its proof standing. */
function toVesselDto(v: Vessel, ownerName: string, proof: VesselProofStandingDto): VesselDto {
  return {
    id: v.id,
    tag: v.tag,
    name: v.name,
    construction: v.construction,
    state: v.state,
    volumeL: Number(v.volumeL),
    diameterMm: Number(v.diameterMm),
    owner: { id: v.ownerMembershipId, name: ownerName },
    registeredAt: v.createdAt.toISOString(),
    effectiveState: proof.effectiveState,
    ratedFillBar: proof.ratedFillBar,
    validThroughOn: proof.validThroughOn,
    lengthMm: num(v.lengthMm),
    emptyMassG: num(v.emptyMassG),
    metalInPressurePath: v.metalInPressurePath,
    fibreClass: v.fibreClass,
    arealWeightGPerM2: num(v.arealWeightGPerM2),
    weave: v.weave,
    plies: v.plies,
    resin: v.resin,
    lastLayupOn: v.lastLayupOn,
    updatedAt: v.updatedAt.toISOString(),
    proof,
  }
}

/**
 * Vessel row `v` as its DTO: the owner's name, and its proof standing derived on the club's today
 * from its last passed proof, the events after it, the fills since and the club's policy.
 */
export async function vesselDto(v: Vessel, transaction?: Transaction): Promise<VesselDto> {
  const [owner] = await useDb().query<{ name: string }>(
    'SELECT u.name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $id',
    { bind: { id: v.ownerMembershipId }, type: QueryTypes.SELECT, transaction })
  const rules = await clubVesselRules(v.clubId, transaction)
  if (!rules) notFound('No such club')
  const facts = (await loadProofFacts([v.id], transaction)).get(v.id) ?? { lastPass: null, events: [], fillsSinceProof: 0 }
  const proof = deriveProofStanding({
    state: v.state, construction: v.construction, lastLayupOn: v.lastLayupOn, proofRequestedAt: v.proofRequestedAt ?? null, ...facts,
  }, rules.policy, rules.today)
  return toVesselDto(v, owner?.name ?? '', proof)
}

/**
 * Registers a vessel for `owner`: the club's next number makes its tag (SRG-0042), and it starts
 * awaiting its first proof. The number is taken under the club's counter lock, in the same
 * transaction as the insert, so tags never repeat or skip.
 */
export async function registerVessel(owner: VesselOwner, input: VesselRegistration): Promise<VesselDto> {
  return inTransaction(async (transaction) => {
    const taken = await takeVesselNumber(owner.clubId, transaction)
    if (!taken) notFound('No such club')
    const vessel = await Vessel.create({
      clubId: owner.clubId,
      ownerMembershipId: owner.membershipId,
      number: taken.number,
      tag: vesselTag(taken.tagPrefix, taken.number),
      name: input.name,
      construction: input.construction,
      volumeL: input.volumeL,
      diameterMm: input.diameterMm,
      lengthMm: input.lengthMm ?? null,
      emptyMassG: input.emptyMassG ?? null,
      metalInPressurePath: input.metalInPressurePath,
      fibreClass: input.fibreClass ?? null,
      arealWeightGPerM2: input.arealWeightGPerM2 ?? null,
      weave: input.weave ?? null,
      plies: input.plies ?? null,
      resin: input.fibreClass ? input.resin ?? null : null,
      lastLayupOn: input.fibreClass ? input.lastLayupOn ?? null : null,
      state: 'awaiting_proof',
    }, { transaction })
    return vesselDto(vessel, transaction)
  })
}

/**
 * Vessel `id` as `viewer` may see it, or null: another member's vessel exists for the viewer only
 * with vessels.read_all (the route answers 404 otherwise, never telling "not yours" from "missing").
 */
export async function getVessel(viewer: VesselViewer, id: string): Promise<VesselDto | null> {
  const where = viewer.readAll ? { id, clubId: viewer.clubId } : { id, clubId: viewer.clubId, ownerMembershipId: viewer.membershipId }
  const vessel = await Vessel.findOne({ where })
  return vessel ? vesselDto(vessel) : null
}

/** "Proof lapsing in 30 days": the officers' filter and the owner's notice look this far ahead. */
export const LAPSING_WITHIN_DAYS = 30

/** ORDER BY for each sort field; the vessel id breaks ties so pages never overlap or skip. */
const ORDER_SQL: Record<VesselListQuery['sort'], (dir: 'ASC' | 'DESC') => string> = {
  tag: dir => `v.number ${dir}, v.id ${dir}`,
  name: dir => `lower(v.name) ${dir}, v.id ${dir}`,
  // The owner's name, copied lower-cased onto the membership (migration 0011).
  owner: dir => `m.name_key ${dir}, v.number ${dir}, v.id ${dir}`,
  registered: dir => `v.created_at ${dir}, v.id ${dir}`,
}

interface VesselListRow {
  id: string
  tag: string
  name: string
  construction: VesselListItemDto['construction']
  state: VesselListItemDto['state']
  volume_l: string
  diameter_mm: string
  owner_membership_id: string
  owner_name: string
  created_at: Date
  last_layup_on: string | null
  proof_requested_at: Date | null
}

/**
 * One page of vessels `viewer` may see: their own, or the club's with vessels.read_all; filtered by
 * state, construction and owner, searched by tag or owner name (case-insensitive substring), sorted
 * and paged on the server (a COUNT and the page, never the whole table).
 */
export async function listVessels(viewer: VesselViewer, query: VesselListQuery): Promise<Paged<VesselListItemDto>> {
  const rules = await clubVesselRules(viewer.clubId)
  if (!rules) notFound('No such club')
  const bind: Record<string, unknown> = { clubId: viewer.clubId }
  const where = ['v.club_id = $clubId']
  // A member sees their own whatever the owner filter says.
  if (!viewer.readAll) {
    where.push('v.owner_membership_id = $self')
    bind.self = viewer.membershipId
  }
  else if (query.owner) {
    where.push('v.owner_membership_id = $owner')
    bind.owner = query.owner
  }
  if (query.state) {
    where.push('v.state = $state')
    bind.state = query.state
  }
  if (query.construction) {
    where.push('v.construction = $construction')
    bind.construction = query.construction
  }
  if (query.lapsing) {
    // In service with the last pass current through no later than 30 days from today (or already
    // past it), or already ended by its fill count (allowed fills at events since the pass, the
    // count deriveProofStanding uses) or by a proof-ending event. PostgreSQL's date + months clamps
    // month ends as the arithmetic does.
    where.push(`v.state = 'in_service' AND EXISTS (SELECT 1 FROM (SELECT max(p.tested_on) AS tested_on FROM proof_tests p
        WHERE p.vessel_id = v.id AND p.result = 'pass') lp
      WHERE (lp.tested_on + make_interval(months => CASE v.construction
        ${VESSEL_CONSTRUCTIONS.map((c, i) => `WHEN '${c}' THEN $interval${i}::int`).join(' ')} END))::date <= $lapsingBy::date
      OR (SELECT count(*) FROM fills f WHERE f.vessel_id = v.id AND f.allowed AND f.held_on >= lp.tested_on) >= CASE v.construction
        ${VESSEL_CONSTRUCTIONS.map((c, i) => `WHEN '${c}' THEN $fillLimit${i}::int`).join(' ')} END
      OR EXISTS (SELECT 1 FROM vessel_events e WHERE e.vessel_id = v.id AND e.kind IN (${PROOF_INVALIDATING_EVENTS.map(k => `'${k}'`).join(', ')})
        AND e.happened_on > lp.tested_on AND e.happened_on <= $today::date))`)
    VESSEL_CONSTRUCTIONS.forEach((c, i) => {
      bind[`interval${i}`] = policyIntervalMonths(rules.policy, c)
      bind[`fillLimit${i}`] = policyFillLimit(rules.policy, c)
    })
    bind.today = rules.today
    bind.lapsingBy = addCalendarDays(rules.today, LAPSING_WITHIN_DAYS)
  }
  const q = query.q?.split('\u0000').join('').trim()
  if (q) {
    where.push('(lower(v.tag) LIKE $pattern OR m.name_key LIKE $pattern)')
    bind.pattern = containsPattern(q)
  }
  const conditions = where.join(' AND ')
  const order = ORDER_SQL[query.sort](query.dir === 'desc' ? 'DESC' : 'ASC')
  const db = useDb()
  const [counted] = await db.query<{ total: number }>(
    `SELECT count(*)::int AS total FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id WHERE ${conditions}`,
    { bind, type: QueryTypes.SELECT })
  const total = counted?.total ?? 0
  const offset = (query.page - 1) * query.pageSize
  const rows = offset >= total
    ? []
    : await db.query<VesselListRow>(
        `SELECT v.id, v.tag, v.name, v.construction, v.state, v.volume_l, v.diameter_mm, v.owner_membership_id,
          u.name AS owner_name, v.created_at, v.last_layup_on::text AS last_layup_on, v.proof_requested_at
        FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id JOIN users u ON u.id = m.user_id
        WHERE ${conditions} ORDER BY ${order} LIMIT $limit OFFSET $offset`,
        { bind: { ...bind, limit: query.pageSize, offset }, type: QueryTypes.SELECT })
  const facts = await loadProofFacts(rows.map(r => r.id))
  return {
    items: rows.map((r) => {
      const proof = deriveProofStanding({
        state: r.state, construction: r.construction, lastLayupOn: r.last_layup_on, proofRequestedAt: r.proof_requested_at,
        ...(facts.get(r.id) ?? { lastPass: null, events: [], fillsSinceProof: 0 }),
      }, rules.policy, rules.today)
      return {
        id: r.id,
        tag: r.tag,
        name: r.name,
        construction: r.construction,
        state: r.state,
        volumeL: Number(r.volume_l),
        diameterMm: Number(r.diameter_mm),
        owner: { id: r.owner_membership_id, name: r.owner_name },
        registeredAt: r.created_at.toISOString(),
        effectiveState: proof.effectiveState,
        ratedFillBar: proof.ratedFillBar,
        validThroughOn: proof.validThroughOn,
      }
    }),
    page: query.page,
    pageSize: query.pageSize,
    total,
  }
}

/**
 * Vessel `tag` (the club's own, e.g. SRG-0042) as `viewer` may see it, or null: the same rule as
 * `getVessel` (another member's vessel is null without vessels.read_all), found by the club's key.
 */
export async function getVesselByTag(viewer: VesselViewer, tag: string): Promise<VesselDto | null> {
  const where = viewer.readAll ? { tag, clubId: viewer.clubId } : { tag, clubId: viewer.clubId, ownerMembershipId: viewer.membershipId }
  const found = await Vessel.findOne({ where, attributes: ['id'] })
  return found ? getVessel(viewer, found.id) : null
}
