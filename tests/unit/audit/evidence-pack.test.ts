import { describe, expect, it } from 'vitest'
import { PDFParse } from 'pdf-parse'
import { EvidencePackQuerySchema, evidencePackPeriod } from '../../../shared/schemas/evidence-pack'
import { STARTING_TIER_LEVELS } from '../../../shared/utils/tier-rules'
import { renderEvidencePack } from '../../../server/services/audit/evidence-pack/render'
import { pdfSafe } from '../../../server/services/audit/evidence-pack/table'
import type { EvidencePackData } from '../../../server/services/audit/evidence-pack/gather'

describe('the evidence pack period', () => {
  it.each([
    [{}, '2026-12-03', { from: '2025-12-04', to: '2026-12-03' }],
    [{ to: '2026-06-30' }, '2026-12-03', { from: '2025-07-01', to: '2026-06-30' }],
    [{ from: '2026-01-01' }, '2026-12-03', { from: '2026-01-01', to: '2026-12-03' }],
    [{ from: '2027-01-10' }, '2026-12-03', { from: '2027-01-10', to: '2027-01-10' }],
    [{ from: '2024-02-29', to: '2024-03-01' }, '2026-12-03', { from: '2024-02-29', to: '2024-03-01' }],
  ])('%j on %s covers %j', (q, today, period) => {
    expect(evidencePackPeriod(q, today)).toEqual(period)
  })

  it.each([
    [{ from: '2026-05-02', to: '2026-05-01' }, 'to'],
    [{ from: '2026-02-30' }, 'from'],
    [{ to: '03/12/2026' }, 'to'],
    [{ from: '2020-01-01', to: '2026-01-02' }, 'to'],
  ])('refuses %j at %s', (q, field) => {
    const r = EvidencePackQuerySchema.safeParse(q)
    expect(r.success).toBe(false)
    expect(Object.keys(r.error!.flatten().fieldErrors)).toEqual([field])
  })

  it('takes empty dates as the default', () => {
    expect(EvidencePackQuerySchema.parse({ from: '', to: '' })).toEqual({})
  })
})

describe('text for the built-in PDF fonts', () => {
  it.each([
    ['Zoë Brontë', 'Zoë Brontë'],
    ['Dvořák – “Šárka”', 'Dvorák – “Šárka”'],
    ['Łucja 李', '?ucja ?'],
  ])('%s prints as %s', (text, printed) => {
    expect(pdfSafe(text)).toBe(printed)
  })
})

const POLICY = {
  marginRatio: 1.5, intervalMonths: { single_bottle: 12, spliced_bottles: 6, overwrapped_liner: 12, mandrel_tube: 12, other: 12 },
  fillLimit: { bottle: 10, laminate: 25 }, cureWaitDays: 7, airTestsAllowed: false, distanceRule: 'tnt' as const, kProcess: 0.5, equipmentFactor: 3,
}

/** A pack of `members` invented members and nothing else in it, as the renderer takes it. */
function packOf(members: number): EvidencePackData {
  return {
    club: { name: 'Saltmarsh Test Rocketry', units: 'bar' }, today: '2026-12-03', from: '2025-12-04', to: '2026-12-03',
    generatedAt: new Date('2026-12-03T09:00:00Z'), policy: POLICY, tierLevels: [...STARTING_TIER_LEVELS], juniorCapRank: 1,
    courseNames: { pressure_safety: 'Pressure safety and fill procedure' },
    members: Array.from({ length: members }, (_, i) => ({
      name: `Member ${String(i).padStart(4, '0')}`, status: 'active' as const, usableRank: 1 as const, heldAboveCap: null, junior: false,
      currentCourses: ['Pressure safety and fill procedure'],
    })),
    vessels: [], events: [], incidents: [],
  }
}

describe('the evidence pack PDF', () => {
  it('continues a long table over pages, repeating its title and headings on each, and numbers every page', async () => {
    const pdf = await renderEvidencePack(packOf(150))
    const parser = new PDFParse({ data: new Uint8Array(pdf) })
    const { pages } = await parser.getText()
    await parser.destroy()
    const headings = 'Member Membership Valid tier Current courses'
    const continued = pages.filter(p => p.text.includes('Members (continued)'))
    expect(continued.length).toBeGreaterThanOrEqual(2)
    for (const page of continued) expect(page.text).toContain(headings)
    // Every member row once, in order, and the headings once per page of the table.
    const text = pages.map(p => p.text).join('\n')
    expect(text.match(/Member \d{4} Active/g)).toEqual(Array.from({ length: 150 }, (_, i) => `Member ${String(i).padStart(4, '0')} Active`))
    expect(text.split(headings).length - 1).toBe(continued.length + 1)
    pages.forEach((p, i) => expect(p.text).toContain(`page ${i + 1} of ${pages.length}`))
    expect(text).toContain('No launch event in the period.')
    expect(text).toContain('No incident was reported in the period.')
  })
})
