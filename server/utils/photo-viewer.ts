import { createReadStream } from 'node:fs'
import type { H3Event } from 'h3'
import type { PhotoViewer } from '../services/photos'
import type { Actor } from './auth'

/** What the photos domain needs to know of the signed-in member: their club, membership and vessel rights. */
export function photoViewerOf(actor: Actor): PhotoViewer {
  return {
    clubId: actor.club.id,
    membershipId: actor.membership.id,
    readAll: actorCan(actor, 'vessels.read_all'),
    witness: actorCan(actor, 'vessels.witness'),
    officer: actorCan(actor, 'vessels.quarantine'),
    incidentsAll: actorCan(actor, 'incidents.review') || actorCan(actor, 'audit.read'),
  }
}

/**
 * Sends a stored photo file with the row's type, shown inline under its id, never sniffed into
 * anything else by the browser, cached only by the viewer's own browser.
 */
export function sendPhotoFile(event: H3Event, path: string, contentType: string, fileName: string) {
  setResponseHeaders(event, {
    'content-type': contentType,
    'content-disposition': `inline; filename="${fileName}"`,
    'x-content-type-options': 'nosniff',
    'cache-control': 'private, max-age=300',
  })
  return sendStream(event, createReadStream(path))
}
