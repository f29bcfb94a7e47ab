/**
 * Words shared by pages and e-mails, so each thing is said one way: the caution line that goes
 * with everything about joining, the labels a club secretary reads for a membership awaiting its
 * first dues, and the glossary of the trade's words.
 */
import { MEMBERSHIP_STATUS_LABELS, type MembershipStatus } from './membership-status'

/** The short caution on the sign-up and guardian-consent pages and in every e-mail about joining. */
export const JOINING_CAUTION = 'Water rockets store real energy. Hoopwise keeps the club\'s records; the club\'s own rules, local codes and its qualified people always apply, and nobody fills a vessel before they are trained for it.'

/** The caution with every proof test and pressure figure, on pages and in e-mails about vessels. */
export const PRESSURE_CAUTION = 'Proof-test full of water, from a distance, behind a barrier, and let nobody stand over a pressurised vessel. The club\'s rules, local codes and its qualified people come first.'

/** The glossary's closing caution: the app's words explain, the club and the law decide. */
export const GLOSSARY_CAUTION = 'These explanations help you read the app. They do not replace the club\'s rules, local codes or the judgement of the club\'s qualified people, which always come first.'

/**
 * The label of a membership status in words. "Pending" (never paid) reads as what it waits for:
 * the admin's approval, or once approved, the first dues. The status itself is not changed.
 */
export function membershipStatusLabel(status: MembershipStatus, approvedAt?: string | Date | null): string {
  if (status !== 'pending') return MEMBERSHIP_STATUS_LABELS[status]
  return approvedAt ? 'Approved, first dues unpaid' : 'Awaiting approval'
}

/** One word of the trade and what it means, in plain words. */
export interface GlossaryEntry { term: string, meaning: string }

/** The trade's words the app uses, explained for a newcomer (the glossary page lists them in this order). */
export const GLOSSARY: readonly GlossaryEntry[] = [
  { term: 'Fill', meaning: 'Pumping air (or another gas the club allows) into a vessel before a launch. A fill is recorded: who filled which vessel, to what pressure, at which station.' },
  { term: 'Fill cap', meaning: 'The highest pressure a member may fill a vessel to. It is the lowest of the vessel\'s rated fill, the member\'s tier limit and any limit the club sets for the day.' },
  { term: 'Proof test', meaning: 'A test of a vessel at a pressure above the one it will be used at, done full of water and from a distance, so that a weak vessel fails safely before it is ever filled with air.' },
  { term: 'Rated fill', meaning: 'The pressure a vessel may be filled to in use, set from its proof test with a safety margin. It is always below the proof test pressure.' },
  { term: 'In service', meaning: 'A vessel that has passed its proof test, is not past its retest date and has not been taken out of use. Only vessels in service may be filled.' },
  { term: 'Standoff', meaning: 'The distance people keep from a pressurised vessel while it is filled or released. Any standoff the app shows is a minimum; the club\'s own rules may demand more.' },
  { term: 'Tier', meaning: 'A step of experience a member has been signed off for. Each tier allows certain vessels and pressures; juniors hold at most the club\'s junior tier.' },
  { term: 'Bench', meaning: 'The workshop bench where vessels are built, inspected and prepared, and where the proof test equipment stands.' },
]
