import { beforeAll, describe, expect, inject, it } from 'vitest'
import QRCode from 'qrcode'
import { api } from '../../support/http'
import { makeClub, makeMember, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import type { VesselDto, VesselLabelDto } from '../../../shared/types/vessels'

const bottle = (name: string) => ({ name, construction: 'single_bottle', volumeL: 2, diameterMm: 102 })

/** A prefix of five random capitals: a club of the test's own, so its tags are the test's alone. */
function randomPrefix(): string {
  return Array.from({ length: 5 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')
}

async function memberWithCookie(clubId?: string): Promise<MadeMember & { cookie: string }> {
  const m = await makeMember({ clubId })
  return { ...m, cookie: await signIn(inject('baseUrl'), m.email, m.password) }
}

async function register(cookie: string, name: string): Promise<VesselDto> {
  const res = await api<VesselDto>('/api/vessels', { method: 'POST', as: cookie, body: bottle(name) })
  expect(res.status).toBe(201)
  return res.body
}

describe('GET /api/vessels/by-tag/[tag]: pages find a vessel by its tag', () => {
  let alice: MadeMember & { cookie: string }
  let bruno: MadeMember & { cookie: string }
  let alices: VesselDto
  let brunos: VesselDto

  beforeAll(async () => {
    alice = await memberWithCookie()
    bruno = await memberWithCookie()
    alices = await register(alice.cookie, 'Alice by tag')
    brunos = await register(bruno.cookie, 'Bruno by tag')
  })

  it('gives the owner their vessel by its tag, the same as by its id, in any letter case', async () => {
    const byId = await api<VesselDto>(`/api/vessels/${alices.id}`, { as: alice.cookie })
    const byTag = await api<VesselDto>(`/api/vessels/by-tag/${alices.tag}`, { as: alice.cookie })
    expect(byTag.status).toBe(200)
    expect(byTag.body).toEqual(byId.body)
    const lower = await api<VesselDto>(`/api/vessels/by-tag/${alices.tag.toLowerCase()}`, { as: alice.cookie })
    expect(lower.body.id).toBe(alices.id)
  })

  it('answers 404 for another member\'s vessel by tag, without naming it', async () => {
    const other = await api(`/api/vessels/by-tag/${brunos.tag}`, { as: alice.cookie })
    expect(other.status).toBe(404)
    expect(JSON.stringify(other.body)).not.toContain(brunos.name)
  })

  it.each(['instructor', 'safety'] as const)('shows a %s (vessels.read_all) any member\'s vessel by tag', async (as) => {
    const res = await api<VesselDto>(`/api/vessels/by-tag/${brunos.tag}`, { as })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: brunos.id, owner: { id: bruno.memberId } })
  })

  it.each([
    ['a tag nobody has', 'ZZZZZ-9999'],
    ['something that is not a tag', 'not-a-tag'],
    ['a tag without its number', 'SRG-'],
  ])('answers 404 for %s', async (_label, tag) => {
    expect((await api(`/api/vessels/by-tag/${encodeURIComponent(tag)}`, { as: alice.cookie })).status).toBe(404)
  })

  it('keeps another club\'s vessel out of reach by tag, even for an officer of the demo club', async () => {
    const prefix = randomPrefix()
    const club = await makeClub({ name: `Tag Club ${prefix}`, tagPrefix: prefix })
    const far = await memberWithCookie(club.id)
    const theirs = await register(far.cookie, 'Far by tag')
    expect((await api(`/api/vessels/by-tag/${theirs.tag}`, { as: 'safety' })).status).toBe(404)
  })
})

describe('GET /api/vessels/[id]/label: the printable label and its QR code', () => {
  const prefix = randomPrefix()
  const publicUrl = `https://launch-${prefix.toLowerCase()}.example.org/`
  let owner: MadeMember & { cookie: string }
  let other: MadeMember & { cookie: string }
  let vessel: VesselDto

  beforeAll(async () => {
    const club = await makeClub({ name: `Label Club ${prefix}`, tagPrefix: prefix, publicUrl })
    owner = await memberWithCookie(club.id)
    other = await memberWithCookie(club.id)
    vessel = await register(owner.cookie, 'Label Gannet')
  })

  it('points the QR code at the vessel\'s page on the club\'s public address', async () => {
    const res = await api<VesselLabelDto>(`/api/vessels/${vessel.id}/label`, { as: owner.cookie })
    expect(res.status).toBe(200)
    const pageUrl = `https://launch-${prefix.toLowerCase()}.example.org/vessels/${vessel.tag}`
    expect(res.body).toMatchObject({
      id: vessel.id, tag: vessel.tag, name: 'Label Gannet', construction: 'single_bottle',
      ownerName: owner.name, ratedFillBar: null, pageUrl,
    })
    expect(res.body.qrSvg).toMatch(/^<svg [^>]*viewBox="0 0 \d+ \d+"/)
    // The same address drawn by the same library is the same picture: the code encodes pageUrl.
    expect(res.body.qrSvg).toBe(await QRCode.toString(pageUrl, { type: 'svg', errorCorrectionLevel: 'M', margin: 0 }))
    expect(res.body.qrSvg).not.toBe(await QRCode.toString(`http://127.0.0.1/vessels/${vessel.tag}`, { type: 'svg', errorCorrectionLevel: 'M', margin: 0 }))
  })

  it('answers 404 for another member\'s vessel and for no vessel at all', async () => {
    expect((await api(`/api/vessels/${vessel.id}/label`, { as: other.cookie })).status).toBe(404)
    expect((await api(`/api/vessels/${other.memberId}/label`, { as: owner.cookie })).status).toBe(404)
    expect((await api('/api/vessels/not-a-uuid/label', { as: owner.cookie })).status).toBe(404)
  })
})
