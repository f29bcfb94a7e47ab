import { describe, expect, it } from 'vitest'
import { MEMBER_ACTION_RULES, offeredMemberActions, type MemberActionName, type MembershipFacts } from '../../../shared/utils/member-actions'
import type { ApprovalFacts } from '../../../shared/utils/approval'

const ME = 'aaaaaaaa-0000-4000-8000-000000000001'
const THEM = 'bbbbbbbb-0000-4000-8000-000000000002'
const T = '2026-01-10T10:00:00.000Z'

type Member = MembershipFacts & ApprovalFacts
const member = (over: Partial<Member> = {}): Member => ({
  id: THEM, name: 'Rowan Vale', status: 'active', approvedAt: T, suspendedAt: null, resignedAt: null,
  junior: false, emailVerified: true, guardianEmail: null, guardianConsentAt: null, ...over,
})

// The member page offers exactly these; each row is worked out from the club's rules by hand.
describe('offeredMemberActions: what the member page offers', () => {
  it.each<{ case: string, m: Member, actor?: string, want: MemberActionName[] }>([
    { case: 'an active member', m: member(), want: ['suspend', 'resign'] },
    { case: 'the admin themself', m: member({ id: ME }), actor: ME, want: [] },
    { case: 'a ready sign-up', m: member({ status: 'pending', approvedAt: null }), want: ['approve', 'suspend', 'resign'] },
    { case: 'a sign-up with its e-mail unconfirmed', m: member({ status: 'pending', approvedAt: null, emailVerified: false }), want: ['suspend', 'resign'] },
    { case: 'an approved, unpaid member', m: member({ status: 'pending' }), want: ['suspend', 'resign'] },
    { case: 'a suspended member', m: member({ status: 'suspended', suspendedAt: T }), want: ['reinstate', 'resign'] },
    // Resigned wins over suspended in the status, but the suspension can still be lifted (as the server allows).
    { case: 'a suspended member who resigned', m: member({ status: 'resigned', suspendedAt: T, resignedAt: T }), want: ['reinstate', 'rejoin'] },
    { case: 'a resigned member', m: member({ status: 'resigned', resignedAt: T }), want: ['rejoin'] },
    { case: 'a junior whose guardian has not consented', m: member({ junior: true, guardianEmail: 'g@example.org' }), want: ['suspend', 'resign', 'guardian-consent'] },
    { case: 'a junior sign-up without consent', m: member({ status: 'pending', approvedAt: null, junior: true, guardianEmail: 'g@example.org' }), want: ['suspend', 'resign', 'guardian-consent'] },
    { case: 'a junior with no guardian e-mail', m: member({ junior: true }), want: ['suspend', 'resign'] },
    { case: 'a junior whose guardian consented', m: member({ junior: true, guardianEmail: 'g@example.org', guardianConsentAt: T }), want: ['suspend', 'resign'] },
  ])('$case → $want', ({ m, actor, want }) => {
    expect(offeredMemberActions(m, actor ?? ME)).toEqual(want)
  })
})

describe('MEMBER_ACTION_RULES: the server refuses what the page does not offer', () => {
  it.each<{ action: MemberActionName, m: Member, actor?: string, code: string | null }>([
    { action: 'approve', m: member(), code: 'ALREADY_APPROVED' },
    { action: 'approve', m: member({ status: 'lapsed', approvedAt: null }), code: 'NOT_PENDING' },
    { action: 'approve', m: member({ status: 'pending', approvedAt: null }), code: null },
    { action: 'suspend', m: member({ id: ME }), actor: ME, code: 'SELF_ACTION' },
    { action: 'suspend', m: member({ status: 'suspended', suspendedAt: T }), code: 'ALREADY_SUSPENDED' },
    { action: 'suspend', m: member({ status: 'resigned', resignedAt: T }), code: 'MEMBER_RESIGNED' },
    { action: 'reinstate', m: member(), code: 'NOT_SUSPENDED' },
    { action: 'resign', m: member({ id: ME }), actor: ME, code: 'SELF_ACTION' },
    { action: 'resign', m: member({ status: 'resigned', resignedAt: T }), code: 'ALREADY_RESIGNED' },
    { action: 'rejoin', m: member(), code: 'NOT_RESIGNED' },
    { action: 'guardian-consent', m: member(), code: 'NOT_JUNIOR' },
    { action: 'guardian-consent', m: member({ junior: true }), code: 'NO_GUARDIAN' },
    { action: 'guardian-consent', m: member({ junior: true, guardianEmail: 'g@example.org', guardianConsentAt: T }), code: 'ALREADY_CONSENTED' },
  ])('$action on $m.status → $code', ({ action, m, actor, code }) => {
    expect(MEMBER_ACTION_RULES[action](m, actor ?? ME)?.code ?? null).toBe(code)
  })

  // The page and the server read one table: every offered action passes the server's rule, every
  // other one is refused by it (approval also by its blockers).
  it('offers an action exactly when the server would not refuse it', () => {
    const statuses = ['pending', 'active', 'grace', 'lapsed', 'suspended', 'resigned'] as const
    for (const status of statuses) {
      for (const approvedAt of [null, T]) {
        for (const suspendedAt of [null, T]) {
          for (const resignedAt of [null, T]) {
            for (const junior of [false, true]) {
              for (const id of [ME, THEM]) {
                const m = member({ id, status, approvedAt, suspendedAt, resignedAt, junior, guardianEmail: junior ? 'g@example.org' : null })
                const offered = offeredMemberActions(m, ME)
                for (const action of Object.keys(MEMBER_ACTION_RULES) as MemberActionName[]) {
                  const refused = MEMBER_ACTION_RULES[action](m, ME) !== null
                  if (offered.includes(action)) expect(refused).toBe(false)
                  else if (action !== 'approve') expect(refused).toBe(true)
                }
              }
            }
          }
        }
      }
    }
  })
})
