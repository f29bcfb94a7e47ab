import { describe, expect, it } from 'vitest'
import { attentionFor } from '../../../server/services/members/standing'
import type { ClubDto } from '../../../shared/types/clubs'
import type { MemberDto } from '../../../shared/types/members'

describe('my standing does not promise more than the records allow', () => {
  it('says a lapsed member\'s renewal brings back training and bookings, and what else a fill needs', () => {
    const club: ClubDto = { id: 'c', name: 'Guild', timeZone: 'Europe/London', units: 'bar', graceDays: 30 }
    const member = {
      status: 'lapsed', paidThrough: '2026-01-31', approvedAt: '2025-01-01T00:00:00Z', emailVerified: true, junior: false,
      waiver: { current: true, currentVersion: 1, acceptedVersion: 1, acceptedAt: '2025-01-02T00:00:00Z' },
    } as unknown as MemberDto
    const lapsed = attentionFor(member, club, '2026-04-01').find(i => i.code === 'DUES_LAPSED')
    expect(lapsed?.message).toMatch(/Renewing lets you train and book again/)
    expect(lapsed?.message).toMatch(/a fill also needs a valid pressure tier, the current waiver, a current pressure-safety course and a vessel in service/)
    expect(lapsed?.message).not.toMatch(/train, fill and book/)
  })
})
