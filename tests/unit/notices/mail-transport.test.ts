import { describe, it, expect } from 'vitest'
import { isLoopbackHost, leaseSecondsFor, smtpTlsDecision } from '../../../server/services/notices/delivery'

describe('SMTP requires TLS unless the host is this machine', () => {
  it.each([
    ['localhost', true], ['LOCALHOST', true], ['localhost.', true], ['mail.localhost', false],
    ['127.0.0.1', true], ['127.1.2.3', true], ['127.255.255.255', true], ['::1', true], ['[::1]', true],
    ['::ffff:127.0.0.1', true], ['0:0:0:0:0:0:0:1', true],
    ['128.0.0.1', false], ['10.0.0.1', false], ['127.0.0.256', false], ['127.0.0', false], ['127.0.0.1.example', false],
    ['localhost.example', false], ['smtp.club.example', false], ['::2', false], ['::ffff:10.0.0.1', false],
  ])('%s is loopback: %s', (host, loopback) => {
    expect(isLoopbackHost(host)).toBe(loopback)
  })

  it.each([
    ['127.0.0.1', false, { send: true, secure: false, requireTLS: false }],
    ['localhost', true, { send: true, secure: true, requireTLS: false }],
    ['::1', false, { send: true, secure: false, requireTLS: false }],
    ['smtp.club.example', false, { send: true, secure: false, requireTLS: true }],
    ['smtp.club.example', true, { send: true, secure: true, requireTLS: false }],
    ['192.0.2.25', false, { send: true, secure: false, requireTLS: true }],
  ])('%s (secure %s) → %o', (host, secure, decision) => {
    expect(smtpTlsDecision(host, secure)).toEqual(decision)
  })

  it('refuses to send without a host', () => {
    expect(smtpTlsDecision('  ', false)).toEqual({ send: false, reason: expect.stringMatching(/NUXT_SMTP_HOST/) })
  })
})

describe('notice lease', () => {
  it.each([
    // Twice the transport's longest quiet wait: connect + greeting + one idle socket.
    [{ connectionMs: 10_000, greetingMs: 10_000, socketMs: 20_000 }, 0, 80],
    [{ connectionMs: 1_000, greetingMs: 1_000, socketMs: 1_500 }, 0, 7],
    [{ connectionMs: 200, greetingMs: 200, socketMs: 200 }, 0, 2],
    [{ connectionMs: 10_000, greetingMs: 10_000, socketMs: 20_000 }, 1, 1],
  ])('from %o and setting %i: %i s', (timeouts, configured, seconds) => {
    expect(leaseSecondsFor(timeouts, configured)).toBe(seconds)
  })
})
