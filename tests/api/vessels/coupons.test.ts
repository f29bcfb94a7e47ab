import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeClub, makeMember, makePhoto, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { Paged } from '../../../shared/types/common'
import type { BurstEstimateDto, CouponTestDto, LayupFamiliesDto } from '../../../shared/types/coupons'
import type { VesselDto } from '../../../shared/types/vessels'

// Estimates worked by hand (arithmetic checks, not reality), with the generic E-glass (σf 3 450 MPa,
// ρf 2.54) and carbon (σf 2 500 MPa, ρf 1.80) figures, Vf 0.35 (common for a hand layup when not measured),
// k_weave 0.5 for woven cloth and the default k_process 0.5 (from memory):
// 3 plies of 300 g/m² E-glass woven on 100 mm: t = 3 × 300/(2.54 × 0.35) µm = 1.012373 mm,
// σ_hoop = 3450 × 0.35 × 0.25 = 301.875 MPa, P = 2 × 1.012373 × 301.875 / 100 MPa = 61.12205 bar; on 50 mm twice that.
const GLASS_3_PLIES_ON_100_BAR = 61.12204724
// 4 plies of 200 g/m² carbon woven on 90 mm: t = 4 × 200/(1.80 × 0.35) µm = 1.269841 mm,
// σ_hoop = 2500 × 0.35 × 0.25 = 218.75 MPa, P = 2 × 1.269841 × 218.75 / 90 MPa = 61.72840 bar.
const CARBON_4_PLIES_ON_90_BAR = 61.72839506
const PSI_IN_BAR = 6894.757293168 / 100_000 // NIST SP 811 B.8

function randomPrefix(): string {
  return Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
}

async function memberWithCookie(clubId?: string): Promise<MadeMember & { cookie: string }> {
  const m = await makeMember({ clubId })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

/** A stored coupon photo of `clubId`, as the upload route leaves one (the bytes do not matter here). */
async function couponPhoto(clubId: string, membershipId: string): Promise<string> {
  return (await makePhoto({ clubId, uploadedBy: membershipId, purpose: 'coupon' })).photoId
}

const glassCoupon = (change: Record<string, unknown> = {}) => ({
  testedOn: clubDay(-10), fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3, resin: 'Laminating Epoxy',
  tubeDiameterMm: 100, burstPressure: 61.12, pressureUnit: 'bar', failureMode: 'hoop_rupture', ...change,
})

async function record(cookie: string, body: unknown) {
  return api<CouponTestDto & { data: { fields: Record<string, string>, reasons: { code: string }[] } }>('/api/coupon-tests', { method: 'POST', as: cookie, body })
}

describe('POST /api/coupon-tests: a member records a coupon burst', () => {
  let club: { id: string }
  let tester: MadeMember & { cookie: string }
  const count = async () => (await sql<{ n: number }>('SELECT count(*)::int AS n FROM coupon_tests WHERE club_id = $1', [club.id]))[0]!.n

  beforeAll(async () => {
    club = await makeClub({ tagPrefix: randomPrefix() })
    tester = await memberWithCookie(club.id)
  })

  it('stores a burst given in psi as bar, with Vf 0.35 when not measured, and answers the coupon\'s estimate', async () => {
    const res = await record(tester.cookie, glassCoupon({ burstPressure: 1000, pressureUnit: 'psi', notes: 'Clean hoop break mid-tube' }))
    expect(res.status).toBe(201)
    // 1 000 psi × 0.068 947 57 bar/psi = 68.95 bar (to the stored hundredth).
    expect(res.body.burstPressureBar).toBeCloseTo(1000 * PSI_IN_BAR, 2)
    expect(res.body).toMatchObject({ fibreVolumeFraction: 0.35, testedBy: { id: tester.memberId, name: tester.name }, familyKey: 'e_glass:300:woven_0_90:laminating epoxy' })
    expect(res.body.estimatedBurstBar).toBeCloseTo(GLASS_3_PLIES_ON_100_BAR, 6)
    expect(res.body.ratio).toBeCloseTo(68.95 / GLASS_3_PLIES_ON_100_BAR, 6)
    const [row] = await sql<{ burst_pressure_bar: string, tested_by_membership_id: string, resin_key: string }>(
      'SELECT burst_pressure_bar, tested_by_membership_id, resin_key FROM coupon_tests WHERE id = $1', [res.body.id])
    expect(row).toEqual({ burst_pressure_bar: '68.95', tested_by_membership_id: tester.memberId, resin_key: 'laminating epoxy' })
  })

  it.each([
    ['MPa', 6.5, 65],
    ['kPa', 6500, 65],
    ['bar', 65, 65],
  ])('converts %s to bar', async (unit, value, bar) => {
    const res = await record(tester.cookie, glassCoupon({ burstPressure: value, pressureUnit: unit }))
    expect(res.status).toBe(201)
    expect(res.body.burstPressureBar).toBe(bar)
  })

  it.each([
    ['a hybrid (no single fibre strength)', { fibreClass: 'hybrid' }, ['fibreClass']],
    ['a unit that is not a pressure unit and no pressure', { pressureUnit: 'atm', burstPressure: undefined }, ['burstPressure', 'pressureUnit']],
    ['half a ply and a zero tube', { plies: 1.5, tubeDiameterMm: 0 }, ['plies', 'tubeDiameterMm']],
    ['a Vf of 0.95 and an unknown failure', { fibreVolumeFraction: 0.95, failureMode: 'exploded' }, ['fibreVolumeFraction', 'failureMode']],
    ['no resin and no date', { resin: '  ', testedOn: '2026-02-30' }, ['resin', 'testedOn']],
  ])('refuses %s with 400 naming the fields, and stores nothing', async (_label, change, fields) => {
    const before = await count()
    const res = await record(tester.cookie, glassCoupon(change))
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields).sort()).toEqual([...fields].sort())
    expect(await count()).toBe(before)
  })

  it('refuses a burst after today and one beyond 2 000 bar with their reasons', async () => {
    const before = await count()
    const res = await record(tester.cookie, glassCoupon({ testedOn: clubDay(2), burstPressure: 30_000, pressureUnit: 'psi' }))
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code).sort()).toEqual(['BURST_PRESSURE_OUT_OF_RANGE', 'COUPON_DATE_IN_FUTURE'])
    expect(await count()).toBe(before)
  })

  it('takes one of the club\'s coupon photos once; another club\'s photo is refused as no such photo', async () => {
    const own = await couponPhoto(club.id, tester.memberId)
    const first = await record(tester.cookie, glassCoupon({ photoId: own }))
    expect(first.status).toBe(201)
    expect(first.body.photoId).toBe(own)
    const again = await record(tester.cookie, glassCoupon({ photoId: own }))
    expect(again.status).toBe(422)
    expect(again.body.data.reasons.map(r => r.code)).toEqual(['PHOTO_IN_USE'])

    const stranger = await makeMember()
    const foreign = await couponPhoto((await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [stranger.memberId]))[0]!.club_id, stranger.memberId)
    const before = await count()
    const res = await record(tester.cookie, glassCoupon({ photoId: foreign }))
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code)).toEqual(['PHOTO_NOT_FOUND'])
    expect(await count()).toBe(before)
    // The database itself refuses a coupon pointing at another club's photo.
    await expect(sql(`INSERT INTO coupon_tests (club_id, tested_by_membership_id, tested_on, fibre_class, areal_weight_g_per_m2, weave, plies,
      resin, resin_key, tube_diameter_mm, burst_pressure_bar, failure_mode, photo_id)
      VALUES ($1, $2, '2026-01-01', 'carbon', 200, 'woven_0_90', 2, 'Epoxy', 'epoxy', 50, 40, 'other', $3)`, [club.id, tester.memberId, foreign])).rejects.toThrow(/foreign key/)
  })

  it.each([
    ['a hybrid', `fibre_class = 'hybrid'`],
    ['a zero burst pressure', 'burst_pressure_bar = 0'],
    ['an unknown failure mode', `failure_mode = 'exploded'`],
    ['a resin key that is not lower-case', `resin_key = 'Epoxy'`],
  ])('refuses %s in the database itself', async (_label, change) => {
    const [row] = await sql<{ id: string }>('SELECT id FROM coupon_tests WHERE club_id = $1 LIMIT 1', [club.id])
    await expect(sql(`UPDATE coupon_tests SET ${change} WHERE id = $1`, [row!.id])).rejects.toThrow(/check constraint/)
  })
})

describe('layup families, their calibration factor, and a vessel\'s burst estimate', () => {
  let club: { id: string }
  let alice: MadeMember & { cookie: string }
  let bruno: MadeMember & { cookie: string }
  // Family A, E-glass 300 g/m² woven in one epoxy (named in two spellings): ratios 0.8, 1.0, 1.2 on
  // 100 mm and 0.9 on 50 mm → sorted 0.8, 0.9, 1.0, 1.2 → median (0.9 + 1.0)/2 = 0.95, min 0.8, max 1.2.
  const familyA = [
    { tubeDiameterMm: 100, burstPressure: 48.9, resin: 'Laminating Epoxy' },
    { tubeDiameterMm: 100, burstPressure: 61.12, resin: 'LAMINATING EPOXY' },
    { tubeDiameterMm: 100, burstPressure: 73.35, resin: 'laminating epoxy' },
    { tubeDiameterMm: 50, burstPressure: 110.02, resin: 'Laminating Epoxy' },
  ]
  const ratiosA = [48.9 / GLASS_3_PLIES_ON_100_BAR, 61.12 / GLASS_3_PLIES_ON_100_BAR, 73.35 / GLASS_3_PLIES_ON_100_BAR, 110.02 / (2 * GLASS_3_PLIES_ON_100_BAR)]
  const medianA = (ratiosA[3]! + ratiosA[1]!) / 2

  beforeAll(async () => {
    club = await makeClub({ tagPrefix: randomPrefix() })
    alice = await memberWithCookie(club.id)
    bruno = await memberWithCookie(club.id)
    for (const c of familyA) expect((await record(bruno.cookie, glassCoupon(c))).status).toBe(201)
    // Family B: carbon 200 g/m² woven in vinyl ester, one coupon: 50 / 61.728 = 0.81.
    expect((await record(alice.cookie, glassCoupon({ fibreClass: 'carbon', arealWeightGPerM2: 200, plies: 4, tubeDiameterMm: 90, resin: 'Vinyl ester', burstPressure: 50 }))).status).toBe(201)
  })

  it('groups the coupons by family and gives each family its median, count, minimum and maximum of measured ÷ estimated', async () => {
    const res = await api<LayupFamiliesDto>('/api/layup-families', { as: alice.cookie })
    expect(res.status).toBe(200)
    expect(res.body.processFactor).toBe(0.5)
    expect(res.body.families.map(f => [f.key, f.couponCount])).toEqual([
      ['carbon:200:woven_0_90:vinyl ester', 1],
      ['e_glass:300:woven_0_90:laminating epoxy', 4],
    ])
    const [carbon, glass] = res.body.families as [LayupFamiliesDto['families'][0], LayupFamiliesDto['families'][0]]
    expect(glass).toMatchObject({ fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', resin: 'Laminating Epoxy' })
    expect(glass.factor.count).toBe(4)
    expect(glass.factor.median).toBeCloseTo(medianA, 9)
    expect(glass.factor.median).toBeCloseTo(0.95, 3)
    expect(glass.factor.min).toBeCloseTo(Math.min(...ratiosA), 9)
    expect(glass.factor.max).toBeCloseTo(Math.max(...ratiosA), 9)
    expect(glass.coupons.map(c => [c.burstPressureBar, Number(c.estimatedBurstBar.toFixed(4))]).sort((a, b) => a[0]! - b[0]!)).toEqual([
      [48.9, 61.122], [61.12, 61.122], [73.35, 61.122], [110.02, 122.2441],
    ])
    expect(carbon.factor).toMatchObject({ count: 1 })
    expect(carbon.factor.median).toBeCloseTo(50 / CARBON_4_PLIES_ON_90_BAR, 9)
    expect(carbon.coupons[0]!.estimatedBurstBar).toBeCloseTo(CARBON_4_PLIES_ON_90_BAR, 6)
  })

  it('lists the coupons server-paged and filtered by family', async () => {
    const page = await api<Paged<CouponTestDto>>('/api/coupon-tests', { as: alice.cookie, query: { family: 'e_glass:300:woven_0_90:Laminating epoxy', pageSize: 3 } })
    expect(page.status).toBe(200)
    expect(page.body.total).toBe(4)
    expect(page.body.items).toHaveLength(3)
    expect(new Set(page.body.items.map(c => c.familyKey))).toEqual(new Set(['e_glass:300:woven_0_90:laminating epoxy']))
    const all = await api<Paged<CouponTestDto>>('/api/coupon-tests', { as: alice.cookie })
    expect(all.body.total).toBe(5)
    expect((await api('/api/coupon-tests', { as: alice.cookie, query: { family: 'carbon:heavy' } })).status).toBe(400)
  })

  async function vessel(body: Record<string, unknown>): Promise<VesselDto> {
    const res = await api<VesselDto>('/api/vessels', { method: 'POST', as: alice.cookie, body: { volumeL: 2, diameterMm: 100, ...body } })
    expect(res.status).toBe(201)
    return res.body
  }
  const laminate = { construction: 'overwrapped_liner', fibreClass: 'e_glass', arealWeightGPerM2: 300, weave: 'woven_0_90', plies: 3 }

  it('calibrates a vessel of family A by its median and says how many coupons stand behind it', async () => {
    const v = await vessel({ name: 'Calibrated', ...laminate, resin: ' laminating EPOXY' })
    const res = await api<BurstEstimateDto>(`/api/vessels/${v.id}/burst-estimate`, { as: alice.cookie })
    expect(res.status).toBe(200)
    if (res.body.estimate === null) return expect.fail(res.body.reason)
    expect(res.body.rawBar).toBeCloseTo(GLASS_3_PLIES_ON_100_BAR, 6)
    expect(res.body.calibratedBar).toBeCloseTo(GLASS_3_PLIES_ON_100_BAR * medianA, 6)
    expect(res.body.couponCount).toBe(4)
    expect(res.body.factor!.median).toBeCloseTo(medianA, 9)
    expect(res.body.family!.key).toBe('e_glass:300:woven_0_90:laminating epoxy')
    expect(res.body.note).toMatch(/only a witnessed proof test sets a rated fill/i)
  })

  it('gives a raw estimate only when no coupon of the family is recorded', async () => {
    const v = await vessel({ name: 'Uncalibrated', ...laminate, resin: 'Polyester' })
    const res = await api<BurstEstimateDto>(`/api/vessels/${v.id}/burst-estimate`, { as: alice.cookie })
    expect(res.body).toMatchObject({ calibratedBar: null, couponCount: 0, factor: null })
    if (res.body.estimate === null) return expect.fail(res.body.reason)
    expect(res.body.rawBar).toBeCloseTo(GLASS_3_PLIES_ON_100_BAR, 6)
  })

  it.each([
    ['a bottle without a laminate', { name: 'Plain', construction: 'single_bottle' }, /no laminate/],
    ['a hybrid laminate', { name: 'Mixed', ...laminate, fibreClass: 'hybrid', resin: 'Laminating epoxy' }, /hybrid/],
  ])('has no estimate for %s, and says why', async (_label, body, reason) => {
    const v = await vessel(body)
    const res = await api<BurstEstimateDto>(`/api/vessels/${v.id}/burst-estimate`, { as: alice.cookie })
    expect(res.status).toBe(200)
    expect(res.body.estimate).toBeNull()
    expect((res.body as { reason: string }).reason).toMatch(reason)
  })

  it('answers 404 for another member\'s vessel and for another club\'s officers', async () => {
    const v = await vessel({ name: 'Private', ...laminate, resin: 'Laminating epoxy' })
    expect((await api(`/api/vessels/${v.id}/burst-estimate`, { as: bruno.cookie })).status).toBe(404)
    expect((await api(`/api/vessels/${v.id}/burst-estimate`, { as: 'safety' })).status).toBe(404)
  })

  it('follows the club\'s own k_process once its safety officer saves one (last: it changes every estimate above)', async () => {
    const officer = await makeMember({ clubId: club.id, roles: ['safety_officer'] })
    const safety = { cookie: await signIn(inject('baseUrl'), officer.email, officer.password) }
    const policy = (await api<Record<string, unknown>>('/api/vessel-policy', { as: safety.cookie })).body
    expect((await api('/api/vessel-policy', { method: 'PUT', as: safety.cookie, body: { ...policy, kProcess: 0.4 } })).status).toBe(200)
    expect((await api<LayupFamiliesDto>('/api/layup-families', { as: alice.cookie })).body.processFactor).toBe(0.4)
    const v = await vessel({ name: 'Reprocessed', ...laminate, resin: 'Polyester' })
    const res = await api<BurstEstimateDto>(`/api/vessels/${v.id}/burst-estimate`, { as: alice.cookie })
    if (res.body.estimate === null) return expect.fail(res.body.reason)
    // P is proportional to k_process: 0.4/0.5 of the hand-worked 61.122 bar.
    expect(res.body.rawBar).toBeCloseTo(GLASS_3_PLIES_ON_100_BAR * 0.8, 6)
  })

  it('keeps another club\'s coupons out of the families and the list', async () => {
    const demo = await api<LayupFamiliesDto>('/api/layup-families', { as: 'member' })
    const keys = demo.body.families.flatMap(f => f.coupons.map(c => c.testedBy.id))
    expect(keys).not.toContain(alice.memberId)
    expect(keys).not.toContain(bruno.memberId)
  })
})

describe('the demo club\'s coupons (seed)', () => {
  it('holds a dozen coupon tests over three layup families, and Petrel\'s estimate is calibrated by its family', async () => {
    const res = await api<LayupFamiliesDto>('/api/layup-families', { as: 'member' })
    const seeded = ['carbon:200:woven_0_90:laminating epoxy', 'carbon:300:hoop_tow:laminating epoxy', 'e_glass:300:woven_0_90:laminating epoxy']
    const families = res.body.families.filter(f => seeded.includes(f.key))
    expect(families.map(f => f.key)).toEqual(seeded)
    expect(families.reduce((n, f) => n + f.factor.count, 0)).toBeGreaterThanOrEqual(12)
    const [petrel] = await sql<{ id: string }>(`SELECT v.id FROM vessels v JOIN memberships m ON m.id = v.owner_membership_id
      JOIN users u ON u.id = m.user_id WHERE u.email = 'member@hoopwise.example' AND v.name = 'Petrel'`)
    const estimate = await api<BurstEstimateDto>(`/api/vessels/${petrel!.id}/burst-estimate`, { as: 'member' })
    if (estimate.body.estimate === null) return expect.fail(estimate.body.reason)
    const glass = families.find(f => f.key === 'e_glass:300:woven_0_90:laminating epoxy')!
    expect(estimate.body.couponCount).toBe(glass.factor.count)
    expect(estimate.body.calibratedBar).toBeCloseTo(estimate.body.rawBar * glass.factor.median, 9)
  })
})
