import { QueryTypes, type Transaction, type Sequelize } from 'sequelize'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { DEFAULT_JUNIOR_CAP_RANK, type TierLevel, type TierRank } from '#shared/utils/tier-rules'
import type { TierTableInput } from '#shared/schemas/tiers'
import type { TierTableDto } from '#shared/types/tiers'

interface LevelRow {
  rank: number
  name: string
  fill_cap_bar: string
  validity_months: number
  required_course_codes: string[]
  held_below_months: number
  min_logged_fills: number
  min_supervised_fills: number
  supervised_fills_above_bar: string | null
  min_age_years: number | null
  own_vessel_proof_required: boolean
  renewal_min_fills: number
}

const LEVEL_COLUMNS = `rank, name, fill_cap_bar, validity_months, required_course_codes, held_below_months, min_logged_fills,
  min_supervised_fills, supervised_fills_above_bar, min_age_years, own_vessel_proof_required, renewal_min_fills`

function toLevel(r: LevelRow): TierLevel {
  return {
    rank: r.rank as TierRank,
    name: r.name,
    fillCapBar: Number(r.fill_cap_bar),
    validityMonths: r.validity_months,
    requiredCourseCodes: r.required_course_codes,
    heldBelowMonths: r.held_below_months,
    minLoggedFills: r.min_logged_fills,
    minSupervisedFills: r.min_supervised_fills,
    supervisedFillsAboveBar: r.supervised_fills_above_bar === null ? null : Number(r.supervised_fills_above_bar),
    minAgeYears: r.min_age_years,
    ownVesselProofRequired: r.own_vessel_proof_required,
    renewalMinFills: r.renewal_min_fills,
  }
}

/**
 * Club `clubId`'s tier table, T0 first, and its junior cap (a club without a vessel policy row has
 * the starting cap). `db` lets the command line read it outside the server.
 */
export async function loadTierTable(clubId: string, transaction?: Transaction, db: Sequelize = useDb()): Promise<TierTableDto> {
  const [levels, cap, courses] = await Promise.all([
    db.query<LevelRow>(`SELECT ${LEVEL_COLUMNS} FROM tier_levels WHERE club_id = :clubId ORDER BY rank`,
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction }),
    db.query<{ junior_cap_rank: number }>('SELECT junior_cap_rank FROM vessel_policies WHERE club_id = :clubId',
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction }),
    db.query<{ code: string, name: string }>('SELECT code, name FROM courses WHERE club_id = :clubId ORDER BY name',
      { replacements: { clubId }, type: QueryTypes.SELECT, transaction }),
  ])
  return { levels: levels.map(toLevel), juniorCapRank: cap[0]?.junior_cap_rank ?? DEFAULT_JUNIOR_CAP_RANK, courses }
}

/** One tier of club `clubId`'s table, or null. */
export async function loadTierLevel(clubId: string, rank: number, transaction?: Transaction, db: Sequelize = useDb()): Promise<TierLevel | null> {
  const [row] = await db.query<LevelRow>(`SELECT ${LEVEL_COLUMNS} FROM tier_levels WHERE club_id = :clubId AND rank = :rank`,
    { replacements: { clubId, rank }, type: QueryTypes.SELECT, transaction })
  return row ? toLevel(row) : null
}

/**
 * The safety officer saves the whole tier table and the junior cap, audited with before and after.
 * The schema has already refused caps that do not rise; the database's deferred trigger checks it
 * again before commit (forced here, so its refusal is a 422 with the same code, not a generic one).
 */
export async function updateTierTable(actor: Actor, input: TierTableInput): Promise<TierTableDto> {
  const clubId = actor.club.id
  return inTransaction(async (transaction) => {
    const before = await loadTierTable(clubId, transaction)
    const known = new Set(before.courses.map(c => c.code))
    const unknown = [...new Set(input.levels.flatMap(l => l.requiredCourseCodes))].filter(code => !known.has(code))
    if (unknown.length) {
      refuse({ code: 'UNKNOWN_COURSE', message: `No course of the club has the code ${unknown.join(', ')}; the codes are ${[...known].join(', ')}.` })
    }
    for (const l of input.levels) {
      await useDb().query(
        `UPDATE tier_levels SET name = :name, fill_cap_bar = :fillCapBar, validity_months = :validityMonths,
           required_course_codes = string_to_array(:codes, ','), held_below_months = :heldBelowMonths, min_logged_fills = :minLoggedFills,
           min_supervised_fills = :minSupervisedFills, supervised_fills_above_bar = :above, min_age_years = :minAge,
           own_vessel_proof_required = :ownProof, renewal_min_fills = :renewalMinFills, updated_at = now()
         WHERE club_id = :clubId AND rank = :rank`,
        {
          replacements: {
            clubId, rank: l.rank, name: l.name, fillCapBar: l.fillCapBar, validityMonths: l.validityMonths,
            // Course codes have no commas (the schema): one text, '' for none (an empty array).
            codes: l.requiredCourseCodes.join(','),
            heldBelowMonths: l.heldBelowMonths, minLoggedFills: l.minLoggedFills, minSupervisedFills: l.minSupervisedFills,
            above: l.supervisedFillsAboveBar, minAge: l.minAgeYears, ownProof: l.ownVesselProofRequired, renewalMinFills: l.renewalMinFills,
          },
          transaction,
        })
    }
    await useDb().query(
      `INSERT INTO vessel_policies (club_id, junior_cap_rank) VALUES (:clubId, :cap)
       ON CONFLICT (club_id) DO UPDATE SET junior_cap_rank = EXCLUDED.junior_cap_rank`,
      { replacements: { clubId, cap: input.juniorCapRank }, transaction })
    try {
      await useDb().query('SET CONSTRAINTS tier_levels_caps_rise IMMEDIATE', { transaction })
    }
    catch {
      refuse({ code: 'TIER_CAPS_NOT_RISING', message: 'Fill caps must rise with each tier, and T0\'s is 0 bar.' })
    }
    const after = await loadTierTable(clubId, transaction)
    await recordAudit(actor, clubId, {
      action: 'policy.tiers', subjectType: 'tier_levels', subjectId: clubId,
      // The table and the junior cap only: the club's course list is not what was edited.
      before: { levels: before.levels, juniorCapRank: before.juniorCapRank }, after: { levels: after.levels, juniorCapRank: after.juniorCapRank },
    }, transaction)
    return after
  }, { uniqueMessage: 'Each tier needs a name of its own.' })
}
