import type { H3Event } from 'h3'
import { TooLargeError } from './request-rules'

/** How long a refused connection lingers, half-closed, before it is reset. */
const LINGER_MS = 2000

/**
 * Closes the connection after the answer, for an answer sent while the request body is still coming
 * (the rest is never read). The socket is half-closed once the answer is out and destroyed a while
 * later (the body stays paused, unread, meanwhile), so a client busy writing — or a loaded machine —
 * still reads the answer before the reset.
 */
export function closeAfterAnswer(event: H3Event): void {
  const socket = event.node.req.socket
  setResponseHeader(event, 'connection', 'close')
  // Node's server would destroy the socket as soon as the answer is written ("Connection: close"),
  // resetting it while the client is still sending, and a reset can swallow the answer on its way: only
  // half-close it then, and reset it after the linger.
  socket.destroySoon = () => socket.end()
  event.node.res.once('finish', () => {
    socket.end()
    setTimeout(() => socket.destroy(), LINGER_MS).unref()
  })
}

/** 413 and close the connection after it: the rest of the body is never read. */
export function refuseTooLarge(event: H3Event, maxBytes: number): never {
  closeAfterAnswer(event)
  throw createError({ statusCode: 413, statusMessage: 'Payload Too Large', message: new TooLargeError(maxBytes).message })
}
