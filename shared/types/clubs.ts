/** The club as the pages see it. Plain objects the routes return, never model instances. */

export interface ClubDto {
  id: string
  name: string
  timeZone: string
  units: 'bar' | 'psi'
  graceDays: number
}
