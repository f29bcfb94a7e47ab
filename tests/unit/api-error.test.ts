import { describe, expect, it } from 'vitest'
import { readApiError, statusWords, wordsOnly } from '../../shared/utils/api-error'

/** What ofetch throws for an answer with `body` (its own message names the method, path and phrase). */
function fetchError(status: number, phrase: string, body: Record<string, unknown>) {
  return Object.assign(new Error(`[POST] "/api/x": ${status} ${phrase}`), { statusCode: status, data: { statusCode: status, statusMessage: phrase, ...body } })
}

const UPPER_SNAKE = /\b[A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+\b/
const PHRASES = /Unprocessable Entity|Bad Request|Forbidden|Unauthorized|Not Found|Too Many Requests|Internal Server Error|Refused|Conflict/

describe('the one error reader', () => {
  it('422: the reasons in words, their codes kept apart for logic only', () => {
    const read = readApiError(fetchError(422, 'Refused', {
      message: 'Your e-mail address is already confirmed.',
      data: { reasons: [{ code: 'EMAIL_ALREADY_VERIFIED', message: 'Your e-mail address is already confirmed.' }] },
    }))
    expect(read).toEqual({
      message: 'Your e-mail address is already confirmed.',
      fields: {},
      codes: ['EMAIL_ALREADY_VERIFIED'],
      status: 422,
    })
  })

  it('400: field messages keyed for the form, and the alert says them without the field names', () => {
    const read = readApiError(fetchError(400, 'Bad Request', {
      message: 'email: Enter a valid e-mail address; guardianEmail: Enter a valid e-mail address',
      data: { fields: { email: 'Enter a valid e-mail address', guardianEmail: 'Enter a valid e-mail address' } },
    }))
    expect(read.fields).toEqual({ email: 'Enter a valid e-mail address', guardianEmail: 'Enter a valid e-mail address' })
    expect(read.message).toBe('Enter a valid e-mail address')
  })

  it('403: the capability code in brackets is dropped', () => {
    const read = readApiError(fetchError(403, 'Forbidden', { message: 'You do not have the right to do this (members.manage)' }))
    expect(read.message).toBe('You do not have the right to do this')
  })

  it.each([
    // status, phrase, the body's message → what the screen says
    [422, 'Unprocessable Entity', 'Unprocessable Entity', statusWords(422)],
    [404, 'Not Found', undefined, statusWords(404)],
    [500, 'Server Error', 'Server Error', statusWords(500)],
    [429, 'Too Many Requests', 'Too many sign-up attempts from this address. Try again in 20 minutes.', 'Too many sign-up attempts from this address. Try again in 20 minutes.'],
    [422, 'Refused', 'TOKEN_EXPIRED', statusWords(422)],
    [409, 'Conflict', 'That already exists.', 'That already exists.'],
  ])('%d %s with message %j reads as words', (status, phrase, message, expected) => {
    const read = readApiError(fetchError(status, phrase, message === undefined ? {} : { message }))
    expect(read.message).toBe(expected)
    expect(read.message).not.toMatch(PHRASES)
    expect(read.message).not.toMatch(UPPER_SNAKE)
  })

  it('a request that never reached the server says so, not ofetch\'s technical line', () => {
    const offline = Object.assign(new Error('[GET] "/api/me": <no response> Failed to fetch'), { data: undefined })
    expect(readApiError(offline).message).toBe(statusWords(null))
    expect(readApiError(offline).status).toBeNull()
    expect(readApiError(undefined).message).toBe(statusWords(null))
  })

  it('a useFetch error (status on the error, body in data) reads the same way', () => {
    const nuxtError = { statusCode: 401, statusMessage: 'Unauthorized', message: 'Unauthorized', data: { message: 'Please sign in again' } }
    expect(readApiError(nuxtError).message).toBe('Please sign in again')
  })

  it.each([
    ['Unprocessable Entity', null],
    ['Bad Request.', null],
    ['INVALID_RECORD', null],
    ['Blocked by DUES_NEVER_PAID', null],
    ['[POST] "/api/auth/login": 401 Unauthorized', null],
    ['', null],
    [42, null],
    ['Wrong e-mail or password.', 'Wrong e-mail or password.'],
    ['Not allowed (audit.read)', 'Not allowed'],
    ['Not allowed (SOME_CODE)', 'Not allowed'],
  ])('wordsOnly(%j) → %j', (input, expected) => {
    expect(wordsOnly(input)).toBe(expected)
  })

  it('every status, known or not, has words without codes or reason phrases', () => {
    for (const status of [null, 400, 401, 403, 404, 409, 413, 415, 418, 422, 429, 500, 502, 503]) {
      const words = statusWords(status)
      expect(words).toMatch(/^[A-Z][^]*\.$/)
      expect(words).not.toMatch(PHRASES)
      expect(words).not.toMatch(UPPER_SNAKE)
    }
  })
})
