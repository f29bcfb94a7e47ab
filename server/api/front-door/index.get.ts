import { publicFrontDoor } from '../../services/front-door'

/** The club's public page for visitors: no sign-in, no personal data (names, e-mails) in the answer. */
export default defineEventHandler(async () => {
  return publicFrontDoor()
})
