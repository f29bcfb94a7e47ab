import type { Transaction } from 'sequelize'
import { Club } from '../../models'
import { dateInZone } from '#shared/utils/dates'

/**
 * The club sign-ups join: for now the one club of this deployment (the first created).
 * 503 when the database holds none (the seed has not run).
 */
export async function homeClub(transaction?: Transaction): Promise<Club> {
  const club = await Club.findOne({ order: [['createdAt', 'ASC']], transaction })
  if (!club) throw createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'No club is set up yet' })
  return club
}

/** Today's calendar date (YYYY-MM-DD) in the club's time zone (at `now`, default the current instant). */
export function clubToday(club: Pick<Club, 'timeZone'>, now = new Date()): string {
  return dateInZone(now, club.timeZone)
}

/** The club's public address without a trailing slash: the base of every link in an e-mail. */
export function clubBaseUrl(club: Pick<Club, 'publicUrl'>): string {
  return club.publicUrl.replace(/\/+$/, '')
}
