/** The club as the pages see it. Plain objects the routes return, never model instances. */

export interface ClubDto {
  id: string
  name: string
  timeZone: string
  units: 'bar' | 'psi'
  graceDays: number
}

/** The admin's front-door settings as stored (the form's starting values). */
export interface FrontDoorSettingsDto {
  name: string
  description: string
  meetsWhere: string
  meetsWhen: string
  joiningNote: string
  show: Record<import('../schemas/club').FrontDoorSection, boolean>
}

/**
 * The public page at `/` as a visitor sees it: the club's own texts and dates, places and prices —
 * never a member's name or any other personal data. A section the admin switched off is absent.
 */
export interface PublicFrontDoorDto {
  name: string
  description: string
  meetings?: { where: string, when: string }
  joining?: { note: string }
  dues?: { name: string, audience: 'adult' | 'junior', priceMinor: number, currency: string, periodMonths: number }[]
  training?: { id: string, course: string, startsAt: string, endsAt: string, place: string, spacesLeft: number }[]
  events?: { id: string, heldOn: string, site: string, competition: boolean }[]
  calculator?: true
  passCheck?: true
  timeZone: string
}
