import type { MembershipStatus } from './membership-status'
import { approvalBlockers, type ApprovalFacts } from './approval'

// THE table of what an admin may do to a member: the server refuses with it (422 with the reason)
// and the member page offers exactly the actions it does not refuse.

/** The status actions an admin takes on a member. */
export const MEMBERSHIP_ACTIONS = ['approve', 'suspend', 'reinstate', 'resign', 'rejoin'] as const
export type MembershipActionName = typeof MEMBERSHIP_ACTIONS[number]

/** Every action the member page may offer: the status actions and a fresh guardian's consent link. */
export const MEMBER_ACTIONS = [...MEMBERSHIP_ACTIONS, 'guardian-consent'] as const
export type MemberActionName = typeof MEMBER_ACTIONS[number]

/** A reason an action is refused (the server answers it as 422). */
export interface ActionRefusal { code: string, message: string }

/** What the rules look at: a membership as a plain shape (a model row or a MemberDto both fit). */
export interface MembershipFacts {
  id: string
  status: MembershipStatus
  approvedAt: unknown
  suspendedAt: unknown
  resignedAt: unknown
  junior: boolean
  guardianEmail: string | null
  guardianConsentAt: unknown
}

const selfAction = (m: MembershipFacts, actorMembershipId: string, verb: string): ActionRefusal | null =>
  m.id === actorMembershipId ? { code: 'SELF_ACTION', message: `You cannot ${verb} your own membership; ask another admin.` } : null

/** Why each action is refused for membership `m` when the actor's own membership is `actorMembershipId`, or null. */
export const MEMBER_ACTION_RULES: Record<MemberActionName, (m: MembershipFacts, actorMembershipId: string) => ActionRefusal | null> = {
  'approve': (m) => {
    if (m.approvedAt) return { code: 'ALREADY_APPROVED', message: 'This sign-up has already been approved.' }
    if (m.status !== 'pending') return { code: 'NOT_PENDING', message: `Only a pending sign-up can be approved; this membership is ${m.status}.` }
    return null
  },
  'suspend': (m, actor) => selfAction(m, actor, 'suspend')
    ?? (m.status === 'suspended' ? { code: 'ALREADY_SUSPENDED', message: 'This membership is already suspended.' } : null)
    ?? (m.status === 'resigned' ? { code: 'MEMBER_RESIGNED', message: 'A resigned membership cannot be suspended.' } : null),
  'reinstate': m => (m.suspendedAt ? null : { code: 'NOT_SUSPENDED', message: 'Only a suspended membership can be reinstated.' }),
  'resign': (m, actor) => selfAction(m, actor, 'resign')
    ?? (m.resignedAt ? { code: 'ALREADY_RESIGNED', message: 'This membership is already marked resigned.' } : null),
  'rejoin': m => (m.resignedAt ? null : { code: 'NOT_RESIGNED', message: 'Only a resigned membership can rejoin.' }),
  'guardian-consent': (m) => {
    if (!m.junior) return { code: 'NOT_JUNIOR', message: 'Only a member under 18 needs a guardian\'s consent.' }
    if (!m.guardianEmail) return { code: 'NO_GUARDIAN', message: 'No guardian e-mail is on record: add it under "Edit details" first.' }
    if (m.guardianConsentAt) return { code: 'ALREADY_CONSENTED', message: 'The guardian has already given their consent.' }
    return null
  },
}

/**
 * The actions the member page offers for member `m`: those the rules do not refuse; approval also
 * waits until nothing blocks it (a confirmed e-mail, a junior's guardian consent — the server's 422).
 */
export function offeredMemberActions(m: MembershipFacts & ApprovalFacts, actorMembershipId: string): MemberActionName[] {
  return MEMBER_ACTIONS.filter(action => !MEMBER_ACTION_RULES[action](m, actorMembershipId)
    && (action !== 'approve' || !approvalBlockers(m).length))
}
