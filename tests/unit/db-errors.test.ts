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
