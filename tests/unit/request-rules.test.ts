import { PassThrough } from 'node:stream'
import type { IncomingMessage } from 'node:http'
import { describe, it, expect } from 'vitest'
import {
  requestRuleFor, mediaTypeOf, announcesBody, comesFromAnotherSite, readBoundedBody, boundedStream, TooLargeError,
  DEFAULT_REQUEST_RULE, DEFAULT_MAX_BODY_BYTES,
} from '../../server/utils/request-rules'

describe('requestRuleFor (one table of rules per route)', () => {
  const rules = { 'POST /api/members/[id]/photo': { maxBytes: 5_000_000, mediaTypes: ['multipart/form-data'], streamed: true } }

  it.each([
    ['POST', '/api/auth/login', DEFAULT_REQUEST_RULE],
    ['post', '/api/members/abc/photo', { ...DEFAULT_REQUEST_RULE, ...rules['POST /api/members/[id]/photo'] }],
    ['PUT', '/api/members/abc/photo', DEFAULT_REQUEST_RULE],
    ['POST', '/api/members//photo', DEFAULT_REQUEST_RULE],
    ['POST', '/api/members/abc/photo/x', DEFAULT_REQUEST_RULE],
  ])('%s %s', (method, path, expected) => {
    expect(requestRuleFor(method, path, rules)).toEqual(expected)
  })

  it('gives every route 64 KB of JSON from this site unless the table says otherwise; the opt-out takes forms from anywhere', () => {
    expect(DEFAULT_REQUEST_RULE).toEqual({ maxBytes: 64 * 1024, mediaTypes: ['application/json'], crossSite: false, streamed: false })
    expect(DEFAULT_MAX_BODY_BYTES).toBe(65_536)
    expect(requestRuleFor('POST', '/api/notices/opt-out')).toMatchObject({ mediaTypes: ['application/json', 'application/x-www-form-urlencoded'], crossSite: true })
    expect(requestRuleFor('GET', '/api/notices/opt-out')).toEqual(DEFAULT_REQUEST_RULE)
  })
})

describe('mediaTypeOf (compared without parameters)', () => {
  it.each([
    ['application/json', 'application/json'],
    ['Application/JSON; charset=utf-8', 'application/json'],
    [' text/plain ;charset=UTF-8', 'text/plain'],
    ['multipart/form-data; boundary=----x', 'multipart/form-data'],
    [undefined, ''],
  ])('%s → %s', (header, expected) => {
    expect(mediaTypeOf(header)).toBe(expected)
  })
})

describe('announcesBody', () => {
  it.each([
    [{}, false],
    [{ 'content-length': '0' }, false],
    [{ 'content-length': '12' }, true],
    [{ 'transfer-encoding': 'chunked' }, true],
  ])('%j → %s', (headers, expected) => {
    expect(announcesBody(headers)).toBe(expected)
  })
})

describe('comesFromAnotherSite', () => {
  const PUBLIC = 'https://club.example'
  it.each([
    ['neither header (a non-browser client)', {}, false],
    ['same-origin fetch', { 'sec-fetch-site': 'same-origin', 'origin': PUBLIC }, false],
    ['a typed address', { 'sec-fetch-site': 'none' }, false],
    ['the public origin behind a proxy', { origin: PUBLIC, host: 'app:3000' }, false],
    ['the host the request was sent to', { origin: 'http://127.0.0.1:3100', host: '127.0.0.1:3100' }, false],
    ['another site by Sec-Fetch-Site', { 'sec-fetch-site': 'cross-site' }, true],
    ['a sibling subdomain', { 'sec-fetch-site': 'same-site' }, true],
    ['another Origin', { origin: 'https://evil.example', host: 'club.example' }, true],
    ['another port on the same host', { origin: 'http://127.0.0.1:9999', host: '127.0.0.1:3100' }, true],
    ['Origin null', { origin: 'null', host: 'club.example' }, true],
    ['a same-origin Sec-Fetch-Site but a foreign Origin', { 'sec-fetch-site': 'same-origin', 'origin': 'https://evil.example', 'host': 'club.example' }, true],
  ])('%s → %s', (_label, headers, expected) => {
    expect(comesFromAnotherSite(headers, PUBLIC)).toBe(expected)
  })
})

describe('readBoundedBody', () => {
  const stream = () => new PassThrough() as unknown as IncomingMessage & PassThrough

  it('returns a body within the limit', async () => {
    const req = stream()
    const read = readBoundedBody(req, 10)
    req.write('{"a":')
    req.end('1}')
    expect((await read).toString()).toBe('{"a":1}')
  })

  it('stops at the limit while the body still streams and leaves the rest unread', async () => {
    const req = stream()
    const outcome = readBoundedBody(req, 1024).then(() => null, (error: unknown) => error)
    let written = 0
    for (let i = 0; i < 4 && !req.isPaused(); i++) {
      req.write(Buffer.alloc(512))
      written += 512
      await new Promise(r => setImmediate(r))
    }
    expect(await outcome).toBeInstanceOf(TooLargeError)
    expect(written).toBe(1536)
    expect(req.isPaused()).toBe(true)
    expect(req.listenerCount('data')).toBe(0)
  })
})

describe('boundedStream (for routes that stream uploads to disk)', () => {
  it('passes a body within the limit through unchanged', async () => {
    const req = new PassThrough() as unknown as IncomingMessage & PassThrough
    const out = boundedStream(req, 10)
    req.end('0123456789')
    const chunks: Buffer[] = []
    for await (const chunk of out) chunks.push(chunk as Buffer)
    expect(Buffer.concat(chunks).toString()).toBe('0123456789')
  })

  it('fails past the limit and stops reading the request', async () => {
    const req = new PassThrough() as unknown as IncomingMessage & PassThrough
    const out = boundedStream(req, 1024)
    const failed = new Promise(resolve => out.on('error', resolve))
    out.resume()
    for (let i = 0; i < 3; i++) req.write(Buffer.alloc(512))
    expect(await failed).toBeInstanceOf(TooLargeError)
    expect(req.isPaused()).toBe(true)
  })
})
