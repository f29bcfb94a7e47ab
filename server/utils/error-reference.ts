import { randomBytes } from 'node:crypto'
import { createError, type H3Error, type H3Event } from 'h3'
import { BaseError } from 'sequelize'

/** The one message a client sees for a server-side failure; the reference finds the detail in the log. */
export function referenceMessage(reference: string): string {
  return `Something went wrong on our side (reference ${reference})`
}

/** The ORM error behind `error`, if any (h3 wraps what a handler throws in `cause`). */
function ormErrorOf(error: H3Error): BaseError | undefined {
  return [error, error.cause].find((e): e is BaseError => e instanceof BaseError)
}

/**
 * For an error no handler caught (h3 marks it `unhandled`, always a 500) or any ORM error, the error the client gets instead: the same status, one plain message
 * with a fresh reference, and nothing of the ORM's text, models or columns. The detail goes to `log`
 * as one JSON line with the reference. Any other error is returned as it is.
 */
export function hideServerError(error: H3Error, event: Pick<H3Event, 'method' | 'path'>, log: (line: string) => void = console.error): H3Error {
  const status = error.statusCode ?? 500
  const orm = ormErrorOf(error)
  // A status the code chose on purpose (a 503 "busy", a 4xx) keeps its words; what nobody caught does not.
  if (!orm && !error.unhandled) return error
  const reference = randomBytes(4).toString('hex').toUpperCase()
  const cause = (orm ?? (error.cause instanceof Error ? error.cause : error)) as Error & { parent?: { code?: string } }
  log(JSON.stringify({
    time: new Date().toISOString(),
    level: 'error',
    reference,
    status,
    method: event.method,
    path: event.path.split('?')[0],
    error: { name: cause.name, message: cause.message, code: cause.parent?.code, stack: cause.stack?.split('\n').slice(0, 8).join('\n') },
  }))
  return createError({
    statusCode: status,
    statusMessage: status >= 500 ? 'Server Error' : error.statusMessage,
    message: referenceMessage(reference),
    data: { reference },
  })
}
