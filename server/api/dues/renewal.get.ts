import { renewalOptions } from '../../services/dues'

/** The signed-in member's renewal choices: plans open to their age, what each would pay through, any refusal. */
export default defineEventHandler(async (event) => {
  const actor = await requireMember(event)
  return renewalOptions(actor)
})
