import { describe, it, expect } from 'vitest'
import { addressGroup, clientAddressFrom, parseTrustedProxies, type TrustedRange } from '../../../server/utils/client-address'
import { backoffSeconds, emailKey, signInLogLine, waitWords } from '../../../server/services/accounts/sign-in-limits'
import { deriveKnownDeviceKey, isKnownDevice, rememberKnownDevice, KNOWN_DEVICE_MAX_ENTRIES } from '../../../server/services/accounts/known-device'

describe('addressGroup (the key a client address is counted under)', () => {
  it.each([
    ['203.0.113.7', '203.0.113.7', 'an IPv4 address as it is'],
    ['::ffff:203.0.113.7', '203.0.113.7', 'IPv4-mapped IPv6 as the IPv4 it carries'],
    ['2001:db8:1:2:3:4:5:6', '2001:db8:1:2::/64', 'IPv6 by its /64'],
    ['2001:db8:1:2:ffff:ffff:ffff:ffff', '2001:db8:1:2::/64', 'the last address of the same /64'],
    ['2001:0DB8:0001:0002::1', '2001:db8:1:2::/64', 'a spelling with zeros and capitals'],
    ['2001:db8:1:3::1', '2001:db8:1:3::/64', 'the next /64 apart'],
    ['fe80::1%eth0', 'fe80::/64', 'a link-local address with a zone'],
    ['::1', '::/64', 'IPv6 loopback'],
    ['unknown', 'unknown', 'no address at all'],
  ])('%s → %s (%s)', (address, group) => {
    expect(addressGroup(address)).toBe(group)
  })

  it('puts two addresses of one /64 together and the neighbouring /64 apart', () => {
    expect(addressGroup('2001:db8:aa:bb::1')).toBe(addressGroup('2001:db8:aa:bb:1234:5678:9abc:def0'))
    expect(addressGroup('2001:db8:aa:bb::1')).not.toBe(addressGroup('2001:db8:aa:bc::1'))
  })
})

describe('parseTrustedProxies (NUXT_TRUSTED_PROXIES)', () => {
  it('reads addresses and CIDR ranges of both families, separated by commas or spaces', () => {
    expect(parseTrustedProxies('10.0.0.0/8, 192.0.2.1 2001:db8::/32,::1').map(([a, bits]) => `${a.toString()}/${bits}`))
      .toEqual(['10.0.0.0/8', '192.0.2.1/32', '2001:db8::/32', '::1/128'])
  })

  it('reads nothing as nobody', () => {
    expect(parseTrustedProxies('')).toEqual([])
    expect(parseTrustedProxies(undefined)).toEqual([])
  })

  it.each(['10.0.0.0/33', 'proxy.example', '10.0.0', '2001:db8::/129'])('refuses %s', (entry) => {
    expect(() => parseTrustedProxies(`10.0.0.1,${entry}`)).toThrow(/NUXT_TRUSTED_PROXIES/)
  })
})

describe('clientAddressFrom (who is asking)', () => {
  const proxies = parseTrustedProxies('10.0.0.0/8,2001:db8:ffff::/48')
  it.each<[string | undefined, string | undefined, TrustedRange[], string, string]>([
    ['203.0.113.9', '198.51.100.1', [], '203.0.113.9', 'no proxy configured: the header is ignored'],
    ['203.0.113.9', '198.51.100.1', proxies, '203.0.113.9', 'an untrusted socket: a forged header is ignored'],
    ['10.1.2.3', '198.51.100.1', proxies, '198.51.100.1', 'a trusted proxy: the address it appended'],
    ['10.1.2.3', '198.51.100.66, 198.51.100.1', proxies, '198.51.100.1', 'the client\'s own entries further left are not believed'],
    ['10.1.2.3', '198.51.100.1, 10.9.9.9', proxies, '198.51.100.1', 'a chain of trusted proxies is skipped from the right'],
    ['::ffff:10.1.2.3', '198.51.100.1', proxies, '198.51.100.1', 'a proxy seen as IPv4-mapped IPv6'],
    ['2001:db8:ffff:1::5', '2001:db8:1:2::7', proxies, '2001:db8:1:2::7', 'an IPv6 proxy and client'],
    ['10.1.2.3', '[2001:db8:1:2::7]:4711', proxies, '2001:db8:1:2::7', 'an IPv6 entry with brackets and port'],
    ['10.1.2.3', '198.51.100.1:4711', proxies, '198.51.100.1', 'an IPv4 entry with a port'],
    ['10.1.2.3', 'not-an-address', proxies, '10.1.2.3', 'a malformed entry: the last hop known good'],
    ['10.1.2.3', '10.4.4.4', proxies, '10.4.4.4', 'only trusted hops: the left-most'],
    ['10.1.2.3', '', proxies, '10.1.2.3', 'a proxy without the header'],
    ['::ffff:127.0.0.2', undefined, [], '127.0.0.2', 'a mapped socket address comes back as IPv4'],
    [undefined, '198.51.100.1', proxies, 'unknown', 'no socket address'],
  ])('socket %s, X-Forwarded-For %s → %s (%s)', (socket, header, trusted, expected) => {
    expect(clientAddressFrom(socket, header, trusted)).toBe(expected)
  })
})

describe('backoffSeconds (the account\'s growing wait)', () => {
  it.each([
    [1, 0], [5, 0], [6, 30], [7, 60], [8, 120], [9, 240], [10, 480], [11, 900], [40, 900], [10_000, 900],
  ])('after failure %i in a row waits %i s (5 free, 30 s doubling, at most 900 s)', (failures, seconds) => {
    expect(backoffSeconds(failures, 5, 30, 900)).toBe(seconds)
  })
})

describe('emailKey and waitWords', () => {
  it('keys an e-mail whatever its case, in no more than 43 characters and not in clear', () => {
    expect(emailKey('Ada@Club.example')).toBe(emailKey('ada@club.example'))
    expect(emailKey('ada@club.example')).toHaveLength(43)
    expect(emailKey('ada@club.example')).not.toContain('ada')
  })

  it.each([[1, '1 second'], [1_500, '2 seconds'], [119_000, '119 seconds'], [120_000, '2 minutes'], [900_000, '15 minutes'], [3_599_000, '60 minutes'], [7_200_000, '2 hours'], [86_400_000, '24 hours']])(
    '%i ms → %s', (ms, words) => {
      expect(waitWords(ms)).toBe(words)
    })
})

describe('signInLogLine', () => {
  it('is one JSON line with time, account, address and outcome', () => {
    const line = signInLogLine('limited', 'ada@club.example', '2001:db8::1', { limit: 'account', retryAfterSeconds: 60 }, new Date('2026-03-01T10:00:00Z'))
    expect(line).not.toContain('\n')
    expect(JSON.parse(line)).toEqual({
      time: '2026-03-01T10:00:00.000Z', event: 'sign-in', account: 'ada@club.example', address: '2001:db8::1', outcome: 'limited', limit: 'account', retryAfterSeconds: 60,
    })
  })
})

describe('known-device cookie', () => {
  const key = deriveKnownDeviceKey('test-session-password-that-is-at-least-32-chars')
  const now = 1_800_000_000
  const day = 86_400

  it('knows the account it was issued for, whatever the case, and no other', () => {
    const cookie = rememberKnownDevice(key, undefined, 'ada@club.example', now, 180 * day)
    expect(isKnownDevice(key, cookie, 'ADA@club.example', now + day, 180 * day)).toBe(true)
    expect(isKnownDevice(key, cookie, 'bo@club.example', now + day, 180 * day)).toBe(false)
    expect(cookie).not.toContain('ada')
  })

  it('ends after its lifetime and is not accepted from the future', () => {
    const cookie = rememberKnownDevice(key, undefined, 'ada@club.example', now, 180 * day)
    expect(isKnownDevice(key, cookie, 'ada@club.example', now + 180 * day, 180 * day)).toBe(false)
    expect(isKnownDevice(key, cookie, 'ada@club.example', now - 10, 180 * day)).toBe(false)
  })

  it('refuses an entry signed with another key, altered, or moved in time', () => {
    const other = rememberKnownDevice(deriveKnownDeviceKey('another-session-password-of-32-characters'), undefined, 'ada@club.example', now, 180 * day)
    expect(isKnownDevice(key, other, 'ada@club.example', now, 180 * day)).toBe(false)
    const [, signature] = rememberKnownDevice(key, undefined, 'ada@club.example', now, 180 * day).split('.')
    expect(isKnownDevice(key, `${now + 5}.${signature}`, 'ada@club.example', now + 10, 180 * day)).toBe(false)
    expect(isKnownDevice(key, 'garbage', 'ada@club.example', now, 180 * day)).toBe(false)
  })

  it(`keeps several accounts of one browser, at most ${KNOWN_DEVICE_MAX_ENTRIES}, the newest first`, () => {
    let cookie: string | undefined
    const accounts = Array.from({ length: KNOWN_DEVICE_MAX_ENTRIES + 1 }, (_, i) => `member${i}@club.example`)
    accounts.forEach((a, i) => {
      cookie = rememberKnownDevice(key, cookie, a, now + i, 180 * day)
    })
    expect(cookie!.split('~')).toHaveLength(KNOWN_DEVICE_MAX_ENTRIES)
    expect(isKnownDevice(key, cookie, accounts.at(-1)!, now + 10, 180 * day)).toBe(true)
    expect(isKnownDevice(key, cookie, accounts[1]!, now + 10, 180 * day)).toBe(true)
    expect(isKnownDevice(key, cookie, accounts[0]!, now + 10, 180 * day)).toBe(false)
    // Signing in again renews the account's entry instead of adding a second one.
    const again = rememberKnownDevice(key, cookie, accounts[1]!, now + 20, 180 * day)
    expect(again.split('~')).toHaveLength(KNOWN_DEVICE_MAX_ENTRIES)
    expect(again.startsWith(`${now + 20}.`)).toBe(true)
  })
})
