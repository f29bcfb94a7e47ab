import { beforeAll, describe, expect, inject, it } from 'vitest'
import QRCode from 'qrcode'
import { api } from '../../support/http'
import { ago, clubDay, fromNow, makeClub, makeFillPass, makeMember, makeTier, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import { testEnv } from '../../support/test-env'
import { deriveFillPassKey, fillPassToken } from '../../../server/services/tiers/fill-pass-token'
import type { FillPassDto, FillPassVerifyDto } from '../../../shared/types/fill-passes'

// The test server's session secret signs the passes; the tests sign their own tokens with it only to
// reach passes the factories made (an expired one), and with another secret to forge one.
const key = deriveFillPassKey(testEnv.sessionPassword)
const tokenOf = (url: string) => url.split('/verify/')[1]!

async function memberWithCookie(o: Parameters<typeof makeMember>[0] = {}): Promise<MadeMember & { cookie: string }> {
  const m = await makeMember(o)
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

describe('the fill pass: GET and POST /api/me/fill-pass', () => {
  const publicUrl = `https://field-${Math.random().toString(36).slice(2, 8)}.example.org/`
  let member: MadeMember & { cookie: string }

  beforeAll(async () => {
    const club = await makeClub({ name: `Pass Club ${publicUrl}`, tagPrefix: 'PSS', publicUrl })
    member = await memberWithCookie({ clubId: club.id })
  })

  it('issues a pass whose QR code points at the club\'s public address, valid 12 months, and shows the same one again', async () => {
    const res = await api<FillPassDto>('/api/me/fill-pass', { as: member.cookie })
    expect(res.status).toBe(200)
    expect(res.body.verifyUrl).toMatch(new RegExp(`^${publicUrl.replace(/\./g, '\\.')}verify/[A-Za-z0-9_-]{43}$`))
    // The same address drawn by the same library is the same picture: the code encodes verifyUrl, not the request's host.
    expect(res.body.qrSvg).toBe(await QRCode.toString(res.body.verifyUrl, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 }))
    expect(res.body.qrSvg).not.toBe(await QRCode.toString(`${inject('baseUrl')}/verify/${tokenOf(res.body.verifyUrl)}`, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 }))
    const months = (Date.parse(res.body.expiresAt) - Date.parse(res.body.issuedAt)) / (30.44 * 86_400_000)
    expect(months).toBeGreaterThan(11.9)
    expect(months).toBeLessThan(12.1)
    const again = await api<FillPassDto>('/api/me/fill-pass', { as: member.cookie })
    expect(again.body.verifyUrl).toBe(res.body.verifyUrl)
  })

  it('issues a new pass only when confirmed, and the old one stops working at once', async () => {
    const old = (await api<FillPassDto>('/api/me/fill-pass', { as: member.cookie })).body
    expect((await api(`/api/verify/${tokenOf(old.verifyUrl)}`)).status).toBe(200)
    const unconfirmed = await api('/api/me/fill-pass', { method: 'POST', as: member.cookie, body: {} })
    expect(unconfirmed.status).toBe(400)
    expect((await api(`/api/verify/${tokenOf(old.verifyUrl)}`)).status).toBe(200)

    const renewed = await api<FillPassDto>('/api/me/fill-pass', { method: 'POST', as: member.cookie, body: { renew: true } })
    expect(renewed.status).toBe(200)
    expect(renewed.body.verifyUrl).not.toBe(old.verifyUrl)
    const revoked = await api(`/api/verify/${tokenOf(old.verifyUrl)}`)
    expect(revoked.status).toBe(410)
    expect(revoked.body.message).toMatch(/replaced by a newer one/)
    expect((await api(`/api/verify/${tokenOf(renewed.body.verifyUrl)}`)).status).toBe(200)
    expect((await api<FillPassDto>('/api/me/fill-pass', { as: member.cookie })).body.verifyUrl).toBe(renewed.body.verifyUrl)
  })

  it('needs a signed-in member', async () => {
    expect((await api('/api/me/fill-pass')).status).toBe(401)
  })
})

describe('GET /api/verify/[token]: what anyone scanning the pass sees', () => {
  let holder: MadeMember & { cookie: string }
  let token = ''

  beforeAll(async () => {
    holder = await memberWithCookie({ name: 'Verna Quill', birthDate: '1990-04-02', phone: '+44 7700 900123' })
    const assessor = await makeMember({ roles: ['instructor'] })
    await makeTier({ memberId: holder.memberId, rank: 1, assessorId: assessor.memberId, signedOn: clubDay(-400) })
    await makeTier({ memberId: holder.memberId, rank: 2, assessorId: assessor.memberId, signedOn: clubDay(-100) })
    await makeTier({ memberId: holder.memberId, rank: 3, assessorId: assessor.memberId, signedOn: clubDay(-30), suspended: true })
    await makeTier({ memberId: holder.memberId, rank: 0, assessorId: assessor.memberId, signedOn: clubDay(-800), expiresOn: clubDay(-1) })
    token = tokenOf((await api<FillPassDto>('/api/me/fill-pass', { as: holder.cookie })).body.verifyUrl)
  })

  it('shows only the name, the valid tiers (highest first, with expiry) and whether the membership is active', async () => {
    const res = await api<FillPassVerifyDto>(`/api/verify/${token}`)
    expect(res.status).toBe(200)
    expect(Object.keys(res.body).sort()).toEqual(['active', 'name', 'tiers'])
    expect(res.body.name).toBe('Verna Quill')
    expect(res.body.active).toBe(true)
    // T3 is suspended and T0 expired: only T2 and T1 show, highest first.
    expect(res.body.tiers.map(t => t.code)).toEqual(['T2', 'T1'])
    for (const t of res.body.tiers) expect(Object.keys(t).sort()).toEqual(['code', 'expiresOn', 'name'])
    expect(res.body.tiers[0]!.name).toBe('Reinforced')
    expect(res.body.tiers[0]!.expiresOn).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    const text = JSON.stringify(res.body)
    for (const secret of [holder.email, holder.memberId, '1990-04-02', '7700']) expect(text).not.toContain(secret)
  })

  it('is sent with X-Robots-Tag: noindex, the answer and the page, refusals too', async () => {
    expect((await api(`/api/verify/${token}`)).headers.get('x-robots-tag')).toMatch(/noindex/)
    expect((await api('/api/verify/forged')).headers.get('x-robots-tag')).toMatch(/noindex/)
    const page = await fetch(`${inject('baseUrl')}/verify/${token}`)
    expect(page.headers.get('x-robots-tag')).toMatch(/noindex/)
    expect(await page.text()).toContain('Verna Quill')
    // Other pages stay indexable as before.
    expect((await fetch(`${inject('baseUrl')}/login`)).headers.get('x-robots-tag')).toBeNull()
  })

  it('says when the membership is not active', async () => {
    const lapsed = await makeMember({ paidDays: -90 })
    const { passId } = await makeFillPass({ memberId: lapsed.memberId })
    const res = await api<FillPassVerifyDto>(`/api/verify/${fillPassToken(key, passId)}`)
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ name: lapsed.name, tiers: [], active: false })
  })

  it('refuses an expired pass with 410 and a sentence', async () => {
    const { passId } = await makeFillPass({ memberId: (await makeMember()).memberId, issuedAt: ago('13 months'), expiresAt: ago('1 month') })
    const res = await api(`/api/verify/${fillPassToken(key, passId)}`)
    expect(res.status).toBe(410)
    expect(res.body.message).toMatch(/expired/)
  })

  it('refuses a replaced pass with 410', async () => {
    const m = await makeMember()
    const { passId } = await makeFillPass({ memberId: m.memberId, replacedAt: ago('1 hour') })
    await makeFillPass({ memberId: m.memberId, expiresAt: fromNow('11 months') })
    const res = await api(`/api/verify/${fillPassToken(key, passId)}`)
    expect(res.status).toBe(410)
    expect(res.body.message).toMatch(/replaced/)
  })

  it.each([
    ['signed with another secret', () => fillPassToken(deriveFillPassKey('another-secret-that-is-at-least-32-chars'), '3f2504e0-4f89-41d3-9a0c-0305e82c3301')],
    ['a real token with one character changed', () => `${token.slice(0, 40)}${token[40] === 'A' ? 'B' : 'A'}${token.slice(41)}`],
    ['too short', () => token.slice(0, 20)],
    ['of no fill pass at all, though well signed', () => fillPassToken(key, '3f2504e0-4f89-41d3-9a0c-0305e82c3301')],
    ['far too long', () => 'x'.repeat(300)],
  ])('refuses a token %s with 404 and a sentence, never a 500', async (_, make) => {
    const res = await api(`/api/verify/${encodeURIComponent(make())}`)
    expect(res.status).toBe(404)
    expect(res.body.message).toMatch(/not a fill pass/)
    expect(JSON.stringify(res.body)).not.toContain('Verna')
  })

  it('shows the refusal on the page too, with the same status', async () => {
    const page = await fetch(`${inject('baseUrl')}/verify/${fillPassToken(deriveFillPassKey('another-secret-that-is-at-least-32-chars'), '3f2504e0-4f89-41d3-9a0c-0305e82c3301')}`)
    expect(page.status).toBe(404)
    expect(await page.text()).toContain('Not a valid fill pass')
  })
})

describe('GET /api/fill-passes/[token]/member: the scanned pass resolves to a member for the staff', () => {
  it('answers the member for fills.record_any, 403 for a member, 410 for a replaced pass', async () => {
    const holder = await makeMember({ name: 'Sam Scanned' })
    const { passId } = await makeFillPass({ memberId: holder.memberId })
    const token = fillPassToken(key, passId)
    const res = await api(`/api/fill-passes/${token}/member`, { as: 'instructor' })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ memberId: holder.memberId, name: 'Sam Scanned' })
    expect((await api(`/api/fill-passes/${token}/member`, { as: 'member' })).status).toBe(403)
    expect((await api(`/api/fill-passes/${token}/member`)).status).toBe(401)

    const other = await makeMember()
    const { passId: old } = await makeFillPass({ memberId: other.memberId, replacedAt: ago('1 minute') })
    expect((await api(`/api/fill-passes/${fillPassToken(key, old)}/member`, { as: 'safety' })).status).toBe(410)
  })

  it('does not resolve another club\'s pass', async () => {
    const club = await makeClub({ tagPrefix: 'OTH' })
    const stranger = await makeMember({ clubId: club.id })
    const { passId } = await makeFillPass({ memberId: stranger.memberId })
    expect((await api(`/api/fill-passes/${fillPassToken(key, passId)}/member`, { as: 'instructor' })).status).toBe(404)
  })
})
