import { describe, it, expect } from 'vitest'
import { approvalBlockers } from '../../../shared/utils/approval'

describe('approvalBlockers (what a sign-up waits for before approval)', () => {
  it.each([
    ['an adult with a confirmed e-mail', { emailVerified: true, junior: false, guardianConsentAt: null }, []],
    ['an adult with an unconfirmed e-mail', { emailVerified: false, junior: false, guardianConsentAt: null }, ['EMAIL_NOT_CONFIRMED']],
    ['a junior without consent', { emailVerified: true, junior: true, guardianConsentAt: null }, ['GUARDIAN_CONSENT_MISSING']],
    ['a junior with consent', { emailVerified: true, junior: true, guardianConsentAt: '2026-05-01T10:00:00.000Z' }, []],
    ['a junior with neither', { emailVerified: false, junior: true, guardianConsentAt: null }, ['EMAIL_NOT_CONFIRMED', 'GUARDIAN_CONSENT_MISSING']],
  ])('%s', (_label, facts, codes) => {
    const blockers = approvalBlockers({ name: 'Kestrel Fluke', ...facts })
    expect(blockers.map(b => b.code)).toEqual(codes)
    for (const b of blockers) expect(b.message).toMatch(/^Kestrel Fluke /)
  })
})
