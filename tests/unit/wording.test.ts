import { describe, expect, it } from 'vitest'
import { GLOSSARY, GLOSSARY_CAUTION, JOINING_CAUTION, membershipStatusLabel } from '../../shared/utils/wording'
import { MEMBERSHIP_STATUSES } from '../../shared/utils/membership-status'
import { ROLE_LABELS } from '../../shared/utils/permissions'
import { NOTICE_KINDS, type NoticeKindName } from '../../server/services/notices/kinds'
import { composeNotice } from '../../server/services/notices/render'

const VARS = {
  clubName: 'Saltmarsh Rocketry Guild',
  memberName: 'Odile Marshcombe',
  baseUrl: 'https://rockets.saltmarsh.example',
  actionUrl: 'https://rockets.saltmarsh.example/action?token=abc',
  guardianName: 'Guardian of Odile',
  paidThrough: '2026-03-14',
  changedOn: '2026-03-01',
}
const render = (kind: NoticeKindName) => composeNotice(kind, VARS)

describe('membership labels a club secretary understands', () => {
  it.each([
    ['pending', null, 'Awaiting approval'],
    ['pending', undefined, 'Awaiting approval'],
    ['pending', '2026-03-01T10:00:00.000Z', 'Approved, first dues unpaid'],
    ['active', '2026-03-01T10:00:00.000Z', 'Active'],
    ['grace', null, 'Grace period'],
    ['lapsed', null, 'Lapsed'],
    ['suspended', null, 'Suspended'],
    ['resigned', null, 'Resigned'],
  ] as const)('%s (approved %s) reads "%s"', (status, approvedAt, label) => {
    expect(membershipStatusLabel(status, approvedAt)).toBe(label)
  })

  it('no status label is a code or the bare word "Pending"', () => {
    for (const status of MEMBERSHIP_STATUSES) {
      for (const approvedAt of [null, '2026-03-01T10:00:00.000Z']) {
        const label = membershipStatusLabel(status, approvedAt)
        expect(label).toMatch(/^[A-Z][a-z ,]+$/)
        expect(label).not.toBe('Pending')
      }
    }
  })

  it('one name for the safety role', () => {
    expect(ROLE_LABELS.safety_officer).toBe('Safety officer')
  })
})

describe('e-mails say things the way the pages do', () => {
  it.each(['email_verification', 'signup_approved', 'guardian_consent'] as const)('the joining e-mail %s carries the pages\' caution line', (kind) => {
    const mail = render(kind)
    expect(mail.text).toContain(JOINING_CAUTION)
    expect(mail.html).toContain('Water rockets store real energy.')
  })

  it('the dues reminder never says that dues alone allow a fill', () => {
    const { text, subject } = render('dues_reminder')
    expect(text).not.toMatch(/keep (training, booking and )?filling/i)
    expect(text).not.toMatch(/(dues|renew)[^.]*\b(allow|let)s? you (to )?fill/i)
    expect(text).toContain('they do not by themselves allow a fill')
    expect(subject).toContain('14 March 2026')
  })

  it('e-mail confirmation is called confirmation, never verification or a check', () => {
    for (const kind of Object.keys(NOTICE_KINDS) as NoticeKindName[]) {
      const mail = render(kind)
      expect(`${NOTICE_KINDS[kind].label} ${mail.subject} ${mail.text}`).not.toMatch(/verif|e-mail check/i)
    }
    expect(NOTICE_KINDS.email_verification.label).toBe('E-mail confirmation')
  })
})

describe('the glossary', () => {
  it('explains each trade word the app uses, in sentences', () => {
    const terms = GLOSSARY.map(e => e.term.toLowerCase())
    expect(terms).toEqual(['fill', 'fill cap', 'proof test', 'rated fill', 'in service', 'standoff', 'tier', 'bench'])
    for (const entry of GLOSSARY) expect(entry.meaning).toMatch(/^[A-Z].{40,}\.$/)
  })

  it('defers to the club\'s rules, local codes and qualified people', () => {
    expect(GLOSSARY_CAUTION).toMatch(/club's rules/)
    expect(GLOSSARY_CAUTION).toMatch(/local codes/)
    expect(GLOSSARY_CAUTION).toMatch(/qualified people/)
  })
})
