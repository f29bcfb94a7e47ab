import PDFDocument from 'pdfkit'
import { formatCalendarDate } from '#shared/utils/dates'
import { formatPressureLimit, type PressureUnit } from '#shared/utils/units'
import { MEMBERSHIP_STATUS_LABELS } from '#shared/utils/membership-status'
import { tierCode, type TierLevel } from '#shared/utils/tier-rules'
import { JOINING_CAUTION, PRESSURE_CAUTION } from '#shared/utils/wording'
import { VESSEL_CONSTRUCTION_WORDS } from '#shared/utils/vessel-words'
import { VESSEL_CONSTRUCTIONS } from '#shared/utils/vessel-arithmetic'
import type { EvidencePackData, PackIncident, PackMember } from './gather'
import { drawFacts, drawTable, pdfSafe, sectionHeading, PACK_FONT, PACK_FONT_BOLD } from './table'

const INCIDENT_KIND_LABELS: Record<string, string> = {
  burst: 'Burst', uncommanded_launch: 'Uncommanded launch', injury: 'Injury', near_miss: 'Near miss', other: 'Other',
}

/** A gauge pressure in the club's unit, rounded down (a cap or a rating never reads higher than it is). */
function pressure(bar: number, unit: PressureUnit): string {
  return formatPressureLimit(bar, unit)
}

/** At most `max` characters of `text` on one paragraph. */
function clip(text: string, max: number): string {
  const flat = text.replace(/\s+/g, ' ').trim()
  return flat.length > max ? `${flat.slice(0, max - 1)}…` : flat
}

function memberTier(m: PackMember, levels: Map<number, TierLevel>): string {
  if (m.usableRank === null) return 'No valid tier'
  const name = `${tierCode(m.usableRank)} ${levels.get(m.usableRank)?.name ?? ''}`.trim()
  return m.heldAboveCap !== null ? `${name} (junior; holds ${tierCode(m.heldAboveCap)})` : name
}

function incidentOutcome(i: PackIncident): string {
  const parts = [i.status === 'closed' ? `Closed${i.closedOn ? ` on ${i.closedOn}` : ''}` : 'Open: under review']
  if (i.findings.trim()) parts.push(`Findings: ${clip(i.findings, 400)}`)
  if (i.actions.trim()) parts.push(`Actions: ${clip(i.actions, 400)}`)
  return parts.join('\n')
}

/**
 * The evidence pack as a PDF (A4, the built-in Helvetica): the club and the period, a summary, the
 * safety policy and tier table, members with the tier they may use and their current courses,
 * vessels in service with their last passing proof, the period's launch events with fills and
 * refusals, its incidents with their outcomes (never who was involved or any injury details), and
 * the cautions. Every page carries the club, the period and its number.
 */
export function renderEvidencePack(d: EvidencePackData): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const title = `${d.club.name} evidence pack`
    const doc = new PDFDocument({ size: 'A4', margin: 48, bufferPages: true, info: { Title: pdfSafe(title), Author: pdfSafe(d.club.name) } })
    const chunks: Buffer[] = []
    doc.on('data', (c: Buffer) => chunks.push(c))
    doc.on('end', () => resolve(Buffer.concat(chunks)))
    doc.on('error', reject)
    const unit = d.club.units
    const levels = new Map<number, TierLevel>(d.tierLevels.map(l => [l.rank, l]))
    const period = `${formatCalendarDate(d.from)} to ${formatCalendarDate(d.to)}`

    doc.font(PACK_FONT_BOLD).fontSize(20).text(pdfSafe(d.club.name))
    doc.font(PACK_FONT).fontSize(13).text('Evidence pack: safety records for a venue, landowner or insurer').moveDown(0.4)
    doc.fontSize(10).text(`Period: ${period}`)
    doc.text(`Members, tiers, courses and vessels as on ${formatCalendarDate(d.today)}; generated ${d.generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`)
    doc.text(`Pressures are gauge pressures in ${unit}, rounded down (1 bar = 14.5 psi).`)

    const fills = d.events.reduce((a, e) => a + e.fills, 0)
    const refusals = d.events.reduce((a, e) => a + e.refusals, 0)
    const supervised = d.events.reduce((a, e) => a + e.supervisedFills, 0)
    sectionHeading(doc, 'Summary')
    drawFacts(doc, 'Summary', ['Record', 'In the pack'], [
      ['Members', String(d.members.length)],
      ['Members with a valid tier', String(d.members.filter(m => m.usableRank !== null).length)],
      ['Vessels in service', String(d.vessels.length)],
      ['Launch events in the period', String(d.events.length)],
      ['Fills in the period', `${fills} (${supervised} supervised)`],
      ['Fill attempts refused', String(refusals)],
      ['Incidents in the period', `${d.incidents.length} (${d.incidents.filter(i => i.status === 'open').length} open)`],
    ])

    const p = d.policy
    sectionHeading(doc, 'Safety policy')
    drawFacts(doc, 'Safety policy', ['Setting', 'Value'], [
      ['Proof margin (proof pressure ÷ rated fill)', `${p.marginRatio}`],
      ...VESSEL_CONSTRUCTIONS.map(c => [`Proof interval: ${VESSEL_CONSTRUCTION_WORDS[c].label.toLowerCase()}`, `${p.intervalMonths[c]} months`] as [string, string]),
      ['Fill limit between proofs: bottles', `${p.fillLimit.bottle} fills`],
      ['Fill limit between proofs: laminates', `${p.fillLimit.laminate} fills`],
      ['Cure wait before a proof test', `${p.cureWaitDays} days`],
      ['Air proof tests allowed', p.airTestsAllowed ? 'Yes' : 'No: water only'],
      ['Distance rule', p.distanceRule === 'tnt' ? 'R = 20·TNT^(1/3)' : 'R = 20·(2·TNT)^(1/3)'],
      ['Hand-layup process factor', `${p.kProcess}`],
      ['Equipment factor for fill stations', `${p.equipmentFactor}`],
      ['Junior cap (juniors hold at most)', `${tierCode(d.juniorCapRank)} ${levels.get(d.juniorCapRank)?.name ?? ''}`.trim()],
    ])

    sectionHeading(doc, 'Tier table')
    drawTable(doc, {
      title: 'Tier table',
      columns: [
        { header: 'Tier', width: 1.6 }, { header: 'Fill cap', width: 1.3 }, { header: 'Valid for', width: 1.1 },
        { header: 'Courses', width: 2.2 }, { header: 'Tier below held', width: 1.1 }, { header: 'Fills logged / supervised', width: 1.4 },
        { header: 'Minimum age', width: 0.9 }, { header: 'Own vessel proved', width: 0.9 }, { header: 'Fills to renew', width: 0.9 },
      ],
      rows: d.tierLevels.map(l => [
        `${tierCode(l.rank)} ${l.name}`, l.fillCapBar === 0 ? 'No fills' : pressure(l.fillCapBar, unit), `${l.validityMonths} months`,
        l.requiredCourseCodes.map(c => d.courseNames[c] ?? c).join(', ') || 'None',
        l.heldBelowMonths ? `${l.heldBelowMonths} months` : 'Not needed',
        `${l.minLoggedFills} / ${l.minSupervisedFills}${l.supervisedFillsAboveBar === null ? '' : ` above ${formatPressureLimit(l.supervisedFillsAboveBar, unit)}`}`,
        l.minAgeYears === null ? 'None' : String(l.minAgeYears), l.ownVesselProofRequired ? 'Yes' : 'No', String(l.renewalMinFills),
      ]),
      empty: 'The club has no tier table.',
    })

    sectionHeading(doc, 'Members')
    drawTable(doc, {
      title: 'Members',
      columns: [{ header: 'Member', width: 2.2 }, { header: 'Membership', width: 1.2 }, { header: 'Valid tier', width: 2.6 }, { header: 'Current courses', width: 3.6 }],
      rows: d.members.map(m => [m.name, MEMBERSHIP_STATUS_LABELS[m.status], memberTier(m, levels), m.currentCourses.join(', ') || 'None']),
      empty: 'The club has no members.',
    })

    sectionHeading(doc, 'Vessels in service')
    drawTable(doc, {
      title: 'Vessels in service',
      columns: [
        { header: 'Tag', width: 1.1 }, { header: 'Vessel', width: 2 }, { header: 'Owner', width: 2 }, { header: 'Last proof', width: 1.2 },
        { header: 'Proof pressure', width: 1.2 }, { header: 'Rated fill', width: 1.2 }, { header: 'Witness', width: 2 },
      ],
      rows: d.vessels.map(v => [
        v.tag, v.name, v.owner, v.provedOn ?? 'None on record',
        v.proofPressureBar === null ? '' : pressure(v.proofPressureBar, unit), v.ratedFillBar === null ? '' : pressure(v.ratedFillBar, unit), v.witness ?? '',
      ]),
      empty: 'No vessel is in service.',
    })

    sectionHeading(doc, 'Launch events')
    drawTable(doc, {
      title: 'Launch events',
      columns: [
        { header: 'Date', width: 1.1 }, { header: 'Site', width: 2.4 }, { header: 'Pressure cap', width: 1.2 },
        { header: 'Fills', width: 0.8, align: 'right' }, { header: 'Supervised', width: 0.9, align: 'right' }, { header: 'Refused', width: 0.8, align: 'right' },
      ],
      rows: [
        ...d.events.map(e => [e.heldOn, e.cancelled ? `${e.site} (cancelled)` : e.site, pressure(e.pressureCapBar, unit), String(e.fills), String(e.supervisedFills), String(e.refusals)]),
        ...(d.events.length ? [['Total', `${d.events.length} event${d.events.length === 1 ? '' : 's'}`, '', String(fills), String(supervised), String(refusals)]] : []),
      ],
      empty: 'No launch event in the period.',
    })

    sectionHeading(doc, 'Incidents')
    doc.font(PACK_FONT).fontSize(9).fillColor('#333333')
      .text('Who was involved and any injury details stay with the club\'s safety officers; they are not part of this pack.').fillColor('#000000').moveDown(0.3)
    drawTable(doc, {
      title: 'Incidents',
      columns: [
        { header: 'Date', width: 1.1 }, { header: 'Kind', width: 1.9 }, { header: 'Place', width: 1.5 }, { header: 'Vessel', width: 1 },
        { header: 'Event', width: 1.1 }, { header: 'Outcome', width: 3.5 },
      ],
      rows: d.incidents.map(i => [i.happenedOn, INCIDENT_KIND_LABELS[i.kind] ?? i.kind, clip(i.place, 200), i.vesselTag ?? '', i.eventOn ?? '', incidentOutcome(i)]),
      empty: 'No incident was reported in the period.',
    })

    // The cautions stay together on one page.
    sectionHeading(doc, 'Cautions', 150)
    doc.font(PACK_FONT).fontSize(10)
    for (const caution of [PRESSURE_CAUTION, JOINING_CAUTION, 'This pack summarises the club\'s own records on the day it was generated; the records themselves, the club\'s rules and local codes decide.']) {
      doc.text(pdfSafe(caution)).moveDown(0.4)
    }

    // Every page names the club, the period and its number (written last, once the page count is known).
    const range = doc.bufferedPageRange()
    for (let i = range.start; i < range.start + range.count; i++) {
      doc.switchToPage(i)
      const bottom = doc.page.margins.bottom
      doc.page.margins.bottom = 0
      doc.font(PACK_FONT).fontSize(7.5).fillColor('#555555')
        .text(pdfSafe(`${title} · ${d.from} to ${d.to} · page ${i + 1} of ${range.count}`), doc.page.margins.left, doc.page.height - 30, { lineBreak: false })
      doc.page.margins.bottom = bottom
    }
    doc.end()
  })
}
