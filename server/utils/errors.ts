import type { ZodError } from 'zod'
import { UniqueConstraintError, ForeignKeyConstraintError, ValidationError, DatabaseError } from 'sequelize'

export interface Reason { code: string, message: string }

/** 422: a business rule refuses. Body `{ reasons: [{ code, message }] }` as the conventions say. */
export function refuse(reasons: Reason[] | Reason): never {
  const list = Array.isArray(reasons) ? reasons : [reasons]
  throw createError({
    statusCode: 422,
    statusMessage: 'Refused',
    message: list.map(r => r.message).join(' '),
    data: { reasons: list },
  })
}

/** 404: missing, or not yours (the two are never told apart). */
export function notFound(what = 'Not found'): never {
  throw createError({ statusCode: 404, statusMessage: 'Not Found', message: what })
}

/** 409: conflict with another record. */
export function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message })
}

/** 400 with field messages, from a zod error. */
export function badInput(error: ZodError): never {
  const fields: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_'
    fields[key] ??= issue.message
  }
  throw createError({
    statusCode: 400,
    statusMessage: 'Bad Request',
    message: Object.entries(fields).map(([k, v]) => (k === '_' ? v : `${k}: ${v}`)).join('; '),
    data: { fields },
  })
}

/** The 409 message when the database gave up on a write because another one held the same record. */
export const CONCURRENT_CHANGE_MESSAGE = 'Another change to the same record happened at the same moment; try again.'

/**
 * Maps database constraint errors to client errors (409/422), and a deadlock or serialization
 * failure to 409, so a request can never produce a 500 by tripping a constraint or racing another
 * write; anything else is rethrown.
 */
export function mapDbError(error: unknown): never {
  if (error instanceof UniqueConstraintError) conflict('That already exists.')
  if (error instanceof ForeignKeyConstraintError) refuse({ code: 'REFERENCE_MISSING', message: 'A record it refers to does not exist.' })
  // The ORM's own message names models and columns; the client gets a plain one.
  if (error instanceof ValidationError) refuse({ code: 'INVALID_RECORD', message: 'A value does not fit the record.' })
  if (error instanceof DatabaseError) {
    const code = (error.parent as { code?: string } | undefined)?.code
    // deadlock detected, serialization failure: two writes to one record at once; the client may retry
    if (code === '40P01' || code === '40001') conflict(CONCURRENT_CHANGE_MESSAGE)
    // check violation, too long, bad date/time, out of range, bad text representation, NUL in text/JSON, bad encoding
    if (['23514', '22001', '22003', '22007', '22008', '22P02', '22P05', '22021'].includes(code ?? '')) {
      refuse({ code: 'INVALID_RECORD', message: 'The database refused a value that is out of range.' })
    }
  }
  throw error
}
