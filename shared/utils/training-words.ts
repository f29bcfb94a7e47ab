// Words of the training pages and e-mails: the cautions of the composite course, the retraining reasons.
import type { RetrainingReason } from '../schemas/training'
import type { Words } from './words'

/** The caution with the composite handling course, on its pages and in its e-mails. */
export const COMPOSITE_CAUTION = 'Resin and hardener sensitise skin: a reaction, once started, comes back with every contact. Wear nitrile gloves and eye protection, work with ventilation (extraction when sanding, with a fitted respirator), and keep mixed resin off skin and clothes.'

/** Each retraining reason in words, for the flag's form and the record's line. */
export const RETRAINING_REASON_WORDS: Record<RetrainingReason, Words> = {
  changed_workshop: { label: 'The workshop changed', meaning: 'The workshop, its equipment or its procedure changed: the training no longer matches it.' },
  changed_ppe: { label: 'The PPE changed', meaning: 'The protective equipment changed: the member is trained again on the new kind.' },
  skill_not_retained: { label: 'Skill not retained', meaning: 'The member\'s work shows the training was not kept: they take it again.' },
}

/** Where a session's place stands for the member, in words. */
export function placeWords(place: { status: 'enrolled' | 'waiting', position: number | null } | null): string {
  if (!place) return 'Not enrolled'
  return place.status === 'enrolled' ? 'Enrolled' : `Waiting list, number ${place.position}`
}
