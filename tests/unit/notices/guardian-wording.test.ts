import { describe, expect, it } from 'vitest'
import { NOTICE_KINDS } from '../../../server/services/notices/kinds'

describe('the guardian\'s consent e-mail does not promise more than the records allow', () => {
  it('tells a guardian what a junior may do: train first, at most the junior tier, supervised fills, no composite work', () => {
    const { text } = NOTICE_KINDS.guardian_consent.render({
      clubName: 'Saltmarsh Rocketry Guild', memberName: 'Tam Mudflat', baseUrl: 'https://rockets.example', actionUrl: 'https://rockets.example/guardian-consent?token=x',
    })
    expect(text).toMatch(/train first/)
    expect(text).toMatch(/junior tier \(T1 by default: bottle fills up to 6 bar\)/)
    expect(text).toMatch(/only under an instructor's supervision/)
    expect(text).toMatch(/composite and laminate work is for adults/)
  })
})
