import { QueryTypes } from 'sequelize'
import { CouponTest, Photo } from '../../models'
import type { CouponListQuery, CouponTestInput } from '#shared/schemas/coupon'
import type { BurstEstimateDto, CouponTestDto, LayupFamiliesDto, LayupFamilyDto } from '#shared/types/coupons'
import type { Paged } from '#shared/types/common'
import type { CouponFailureMode } from '#shared/utils/coupon-failure-modes'
import { PA_PER_BAR, pressureToPa } from '#shared/utils/units'
import {
  BURST_ESTIMATE_NOTE, DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION,
  calibrationFactor, layupBurstEstimate, layupFamilyKey, resinKey, type FibreClass, type LayupFamily, type Weave,
} from '#shared/utils/vessel-arithmetic'
import { getVessel, type VesselViewer } from './registry'
import { vesselPolicy } from './policy'

/** The highest burst pressure a coupon row holds, bar (the table's check). */
const MAX_COUPON_BURST_BAR = 2000

/**
 * The club's hand-layup process factor k_process, the share of the fibre's strength a hand layup
 * realises: its vessel policy's (default 0.5, from memory, not a published figure, until the safety
 * officer saves another). This is the one place the coupon and estimate code reads it.
 */
export async function clubProcessFactor(clubId: string): Promise<number> {
  return (await vesselPolicy(clubId)).kProcess
}

/** The member recording a coupon test: they did it or witnessed it. */
export interface CouponRecorder {
  clubId: string
  membershipId: string
  name: string
  /** The club's today (YYYY-MM-DD): a coupon cannot be burst in the future. */
  today: string
}

interface CouponRow {
  id: string
  tested_on: string
  tested_by_membership_id: string
  tester_name: string
  fibre_class: FibreClass
  areal_weight_g_per_m2: string
  weave: Weave
  plies: number
  resin: string
  tube_diameter_mm: string
  fibre_volume_fraction: string
  burst_pressure_bar: string
  failure_mode: CouponFailureMode
  notes: string | null
  photo_id: string | null
  created_at: Date
}

const COUPON_COLUMNS = `c.id, to_char(c.tested_on, 'YYYY-MM-DD') AS tested_on, c.tested_by_membership_id, u.name AS tester_name,
  c.fibre_class, c.areal_weight_g_per_m2, c.weave, c.plies, c.resin, c.tube_diameter_mm, c.fibre_volume_fraction,
  c.burst_pressure_bar, c.failure_mode, c.notes, c.photo_id, c.created_at`
const COUPON_FROM = 'coupon_tests c JOIN memberships m ON m.id = c.tested_by_membership_id JOIN users u ON u.id = m.user_id'

/** A coupon's DTO, with the estimate for its own layup and tube at `processFactor` and measured ÷ estimated. */
function toCouponDto(r: CouponRow, processFactor: number): CouponTestDto {
  const layup = { fibreClass: r.fibre_class, arealWeightGPerM2: Number(r.areal_weight_g_per_m2), weave: r.weave, plies: r.plies }
  const fibreVolumeFraction = Number(r.fibre_volume_fraction)
  const estimatedBurstBar = layupBurstEstimate({ ...layup, layupDiameterMm: Number(r.tube_diameter_mm), fibreVolumeFraction, processFactor }).burstPressureBar
  const burstPressureBar = Number(r.burst_pressure_bar)
  return {
    id: r.id,
    familyKey: layupFamilyKey({ ...layup, resin: r.resin }),
    testedOn: r.tested_on,
    testedBy: { id: r.tested_by_membership_id, name: r.tester_name },
    ...layup,
    resin: r.resin,
    tubeDiameterMm: Number(r.tube_diameter_mm),
    fibreVolumeFraction,
    burstPressureBar,
    estimatedBurstBar,
    ratio: burstPressureBar / estimatedBurstBar,
    failureMode: r.failure_mode,
    notes: r.notes,
    photoId: r.photo_id,
    createdAt: r.created_at.toISOString(),
  }
}

/** WHERE conditions and binds for one family's coupons in a club. */
function familyWhere(family: LayupFamily, bind: Record<string, unknown>): string {
  Object.assign(bind, { fibreClass: family.fibreClass, arealWeight: family.arealWeightGPerM2, weave: family.weave, resinKey: family.resinKey })
  return 'c.fibre_class = $fibreClass AND c.areal_weight_g_per_m2 = $arealWeight AND c.weave = $weave AND c.resin_key = $resinKey'
}

/**
 * Records a coupon test for `recorder`'s club: the burst pressure converted to bar, the fibre volume
 * fraction 0.35 (common for a hand layup) unless measured. A photo must be one of the club's coupon
 * photos and not another coupon's; a date after the club's today and a pressure beyond the table's
 * range are refused with their reasons.
 */
export async function recordCouponTest(recorder: CouponRecorder, input: CouponTestInput): Promise<CouponTestDto> {
  const burstPressureBar = Math.round(pressureToPa(input.burstPressure, input.pressureUnit) / PA_PER_BAR * 100) / 100
  const reasons: { code: string, message: string }[] = []
  if (input.testedOn > recorder.today) reasons.push({ code: 'COUPON_DATE_IN_FUTURE', message: `A coupon cannot be burst after today (${recorder.today}).` })
  if (burstPressureBar <= 0 || burstPressureBar > MAX_COUPON_BURST_BAR) {
    reasons.push({ code: 'BURST_PRESSURE_OUT_OF_RANGE', message: `A burst pressure of ${burstPressureBar} bar is outside what a coupon holds (above 0, at most ${MAX_COUPON_BURST_BAR} bar).` })
  }
  return inTransaction(async (transaction) => {
    if (input.photoId) {
      // Another club's photo is "no such photo" here, never told apart from a missing one.
      const photo = await Photo.findOne({ where: { id: input.photoId, clubId: recorder.clubId }, transaction })
      if (!photo) reasons.push({ code: 'PHOTO_NOT_FOUND', message: 'No such photo in this club: upload the coupon\'s photo first.' })
      else if (photo.purpose !== 'coupon') reasons.push({ code: 'PHOTO_NOT_A_COUPON', message: 'That photo was uploaded for a vessel, not for a coupon.' })
      else if (await CouponTest.count({ where: { photoId: photo.id }, transaction }) > 0) {
        reasons.push({ code: 'PHOTO_IN_USE', message: 'That photo already belongs to another coupon test.' })
      }
    }
    if (reasons.length) refuse(reasons)
    const coupon = await CouponTest.create({
      clubId: recorder.clubId,
      testedByMembershipId: recorder.membershipId,
      testedOn: input.testedOn,
      fibreClass: input.fibreClass,
      arealWeightGPerM2: input.arealWeightGPerM2,
      weave: input.weave,
      plies: input.plies,
      resin: input.resin,
      resinKey: resinKey(input.resin),
      tubeDiameterMm: input.tubeDiameterMm,
      fibreVolumeFraction: input.fibreVolumeFraction ?? DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION,
      burstPressureBar,
      failureMode: input.failureMode,
      notes: input.notes ?? null,
      photoId: input.photoId ?? null,
    }, { transaction })
    return toCouponDto({
      id: coupon.id, tested_on: input.testedOn, tested_by_membership_id: recorder.membershipId, tester_name: recorder.name,
      fibre_class: input.fibreClass, areal_weight_g_per_m2: String(input.arealWeightGPerM2), weave: input.weave, plies: input.plies,
      resin: coupon.resin, tube_diameter_mm: String(input.tubeDiameterMm), fibre_volume_fraction: String(coupon.fibreVolumeFraction),
      burst_pressure_bar: String(burstPressureBar), failure_mode: input.failureMode, notes: coupon.notes, photo_id: coupon.photoId,
      created_at: coupon.createdAt,
    }, await clubProcessFactor(recorder.clubId))
  })
}

/** One page of the club's coupon tests, newest first, optionally one family's. Coupons are club knowledge: every member sees them. */
export async function listCouponTests(clubId: string, query: CouponListQuery): Promise<Paged<CouponTestDto>> {
  const bind: Record<string, unknown> = { clubId }
  const where = ['c.club_id = $clubId']
  if (query.family) where.push(familyWhere(query.family, bind))
  const conditions = where.join(' AND ')
  const db = useDb()
  const [counted] = await db.query<{ total: number }>(`SELECT count(*)::int AS total FROM coupon_tests c WHERE ${conditions}`, { bind, type: QueryTypes.SELECT })
  const total = counted?.total ?? 0
  const offset = (query.page - 1) * query.pageSize
  const rows = offset >= total
    ? []
    : await db.query<CouponRow>(
        `SELECT ${COUPON_COLUMNS} FROM ${COUPON_FROM} WHERE ${conditions}
        ORDER BY c.tested_on DESC, c.created_at DESC, c.id DESC LIMIT $limit OFFSET $offset`,
        { bind: { ...bind, limit: query.pageSize, offset }, type: QueryTypes.SELECT })
  const processFactor = await clubProcessFactor(clubId)
  return { items: rows.map(r => toCouponDto(r, processFactor)), page: query.page, pageSize: query.pageSize, total }
}

/**
 * Every layup family the club has burst coupons of: the family's words, its coupons with the
 * estimated and measured burst of each, and the calibration factor (median of measured ÷ estimated,
 * with the count, minimum and maximum). Ordered by fibre, areal weight, weave and resin.
 */
export async function listLayupFamilies(clubId: string): Promise<LayupFamiliesDto> {
  const rows = await useDb().query<CouponRow>(
    `SELECT ${COUPON_COLUMNS} FROM ${COUPON_FROM} WHERE c.club_id = $clubId
    ORDER BY c.fibre_class, c.areal_weight_g_per_m2, c.weave, c.resin_key, c.tested_on, c.created_at, c.id`,
    { bind: { clubId }, type: QueryTypes.SELECT })
  const processFactor = await clubProcessFactor(clubId)
  const families = new Map<string, LayupFamilyDto>()
  for (const coupon of rows.map(r => toCouponDto(r, processFactor))) {
    let family = families.get(coupon.familyKey)
    if (!family) {
      family = {
        key: coupon.familyKey, fibreClass: coupon.fibreClass, arealWeightGPerM2: coupon.arealWeightGPerM2, weave: coupon.weave,
        resin: coupon.resin, couponCount: 0, factor: { median: 0, count: 0, min: 0, max: 0 }, coupons: [],
      }
      families.set(coupon.familyKey, family)
    }
    family.coupons.push(coupon)
  }
  for (const family of families.values()) {
    family.couponCount = family.coupons.length
    family.factor = calibrationFactor(family.coupons.map(c => c.ratio))
  }
  return { processFactor, families: [...families.values()] }
}

/**
 * The burst estimate of vessel `id` as `viewer` may see it (null: missing or not theirs): raw from
 * generic fibre properties (its own diameter, Vf 0.35 as for a hand layup, the club's k_process), and
 * calibrated by the median factor of its family's coupons when there are any. A vessel without a
 * laminate, or of a hybrid, has no estimate and says why. The figure informs; only a witnessed proof
 * test sets a rated fill.
 */
export async function vesselBurstEstimate(viewer: VesselViewer, id: string): Promise<BurstEstimateDto | null> {
  const vessel = await getVessel(viewer, id)
  if (!vessel) return null
  const { fibreClass, arealWeightGPerM2, weave, plies, resin } = vessel
  if (!fibreClass || arealWeightGPerM2 === null || !weave || plies === null) {
    return { estimate: null, reason: 'This vessel has no laminate described, so there is nothing to estimate from: a bottle is rated by its proof test alone.' }
  }
  if (fibreClass === 'hybrid') {
    return { estimate: null, reason: 'A hybrid of several fibres has no single fibre strength to estimate from: only its proof test tells what it holds.' }
  }
  const processFactor = await clubProcessFactor(viewer.clubId)
  const fibreVolumeFraction = DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION
  const rawBar = layupBurstEstimate({ fibreClass, arealWeightGPerM2, weave, plies, layupDiameterMm: vessel.diameterMm, fibreVolumeFraction, processFactor }).burstPressureBar
  const base = { estimate: true as const, rawBar, processFactor, fibreVolumeFraction, note: `${BURST_ESTIMATE_NOTE} Only a witnessed proof test sets a rated fill.` }
  if (!resin) return { ...base, calibratedBar: null, couponCount: 0, factor: null, family: null }

  const family: LayupFamily = { fibreClass, arealWeightGPerM2, weave, resinKey: resinKey(resin) }
  const bind: Record<string, unknown> = { clubId: viewer.clubId }
  const rows = await useDb().query<CouponRow>(
    `SELECT ${COUPON_COLUMNS} FROM ${COUPON_FROM} WHERE c.club_id = $clubId AND ${familyWhere(family, bind)}`,
    { bind, type: QueryTypes.SELECT })
  const words = { key: layupFamilyKey({ fibreClass, arealWeightGPerM2, weave, resin }), fibreClass, arealWeightGPerM2, weave, resin }
  if (!rows.length) return { ...base, calibratedBar: null, couponCount: 0, factor: null, family: words }
  const factor = calibrationFactor(rows.map(r => toCouponDto(r, processFactor).ratio))
  return { ...base, calibratedBar: rawBar * factor.median, couponCount: factor.count, factor, family: words }
}
