import { describe, it, expect, vi, beforeAll } from 'vitest'
import { createError } from 'h3'
import { DatabaseError } from 'sequelize'

// server/utils is auto-imported by Nitro; here createError comes from h3 itself.
beforeAll(() => {
  vi.stubGlobal('createError', createError)
})

const dbError = (code: string) => new DatabaseError(Object.assign(new Error(`pg ${code}`), { code, sql: 'UPDATE …', parameters: [] }) as never)

describe('mapDbError on two writes racing', () => {
  it.each([['40P01', 'deadlock detected'], ['40001', 'serialization failure']])('answers %s (%s) with 409 and a try-again message', async (code) => {
    const { mapDbError, CONCURRENT_CHANGE_MESSAGE } = await import('../../server/utils/errors')
    let thrown: unknown
    try {
      mapDbError(dbError(code))
    }
    catch (error) {
      thrown = error
    }
    expect(thrown).toMatchObject({ statusCode: 409, message: CONCURRENT_CHANGE_MESSAGE })
  })

  it('rethrows a database error it does not know', async () => {
    const { mapDbError } = await import('../../server/utils/errors')
    const error = dbError('57014')
    expect(() => mapDbError(error)).toThrow(error)
  })
})

describe('no ORM text reaches a response', () => {
  it('answers a model validation error with a plain 422 that names no model or column', async () => {
    const { ValidationError } = await import('sequelize')
    const { mapDbError } = await import('../../server/utils/errors')
    const error = new ValidationError('notNull Violation: Membership.guardianEmail cannot be null', [])
    let thrown: { statusCode?: number, message?: string, data?: unknown } = {}
    try {
      mapDbError(error)
    }
    catch (e) {
      thrown = e as typeof thrown
    }
    expect(thrown.statusCode).toBe(422)
    expect(JSON.stringify([thrown.message, thrown.data])).not.toMatch(/Membership|guardian|notNull/i)
  })

  it.each([
    ['an unhandled ORM error (500)', () => createError(dbError('42P01'))],
    ['an error no handler caught', () => Object.assign(createError(new Error('No club is set up yet')), { unhandled: true })],
  ])('replaces %s with one message and a reference, logged with the detail', async (_label, make) => {
    const { hideServerError } = await import('../../server/utils/error-reference')
    const lines: string[] = []
    const error = make()
    const shown = hideServerError(error, { method: 'POST', path: '/api/auth/login?x=1' }, line => lines.push(line))
    expect(shown.statusCode).toBe(error.statusCode)
    const reference = shown.message.match(/^Something went wrong on our side \(reference ([0-9A-F]{8})\)$/)?.[1]
    expect(reference).toBeTruthy()
    expect(shown.data).toEqual({ reference })
    expect(JSON.stringify(shown)).not.toMatch(/pg 42P01|UPDATE|club is set up/)
    expect(lines).toHaveLength(1)
    const logged = JSON.parse(lines[0]!)
    expect(logged).toMatchObject({ level: 'error', reference, method: 'POST', path: '/api/auth/login', status: error.statusCode })
    expect(logged.error.message).toMatch(/pg 42P01|No club is set up yet/)
  })

  it.each([
    ['a client error', 422, 'Not allowed today'],
    ['a 503 the code chose on purpose', 503, 'The server is busy checking other passwords. Try again in a moment.'],
  ])('leaves %s alone and logs nothing', async (_label, statusCode, message) => {
    const { hideServerError } = await import('../../server/utils/error-reference')
    const lines: string[] = []
    const error = createError({ statusCode, message })
    expect(hideServerError(error, { method: 'POST', path: '/x' }, line => lines.push(line))).toBe(error)
    expect(lines).toEqual([])
  })
})
