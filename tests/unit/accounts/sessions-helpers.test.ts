import { afterEach, describe, it, expect, vi } from 'vitest'
import { describeUserAgent } from '../../../shared/utils/user-agent'
import { logAuthEvent } from '../../../server/utils/auth-log'

describe('describeUserAgent (the device in the list of my sessions)', () => {
  it.each([
    ['Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0', 'Firefox on Linux'],
    ['Mozilla/5.0 (Windows NT 10.0; Win64; x64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Safari/537.36', 'Chrome on Windows'],
    ['Mozilla/5.0 (Windows NT 10.0; Win64; x64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Safari/537.36 Edg/126.0.2592.87', 'Edge on Windows'],
    ['Mozilla/5.0 (Macintosh; Intel Mac OS X 14_5) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Safari/605.1.15', 'Safari on macOS'],
    ['Mozilla/5.0 (iPhone; CPU iPhone OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1', 'Safari on iPhone'],
    ['Mozilla/5.0 (Linux; Android 14; Pixel 8) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Mobile Safari/537.36', 'Chrome on Android'],
    ['Mozilla/5.0 (X11; CrOS x86_64 14541.0.0) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Safari/537.36', 'Chrome on ChromeOS'],
    ['curl/8.5.0', 'curl on an unknown system'],
    ['SomeRobot/1.0', 'Unknown browser'],
    ['', 'Unknown browser'],
    [null, 'Unknown browser'],
  ])('%s → %s', (ua, words) => {
    expect(describeUserAgent(ua)).toBe(words)
  })
})

describe('logAuthEvent (one JSON line per sign-in, sign-out or revocation)', () => {
  afterEach(() => {
    vi.restoreAllMocks()
  })

  it('writes time, account, address and outcome as one line of JSON', () => {
    const lines: string[] = []
    vi.spyOn(console, 'log').mockImplementation((line: string) => {
      lines.push(line)
    })
    logAuthEvent({ account: 'Ann@Club.Example', address: '192.0.2.7', outcome: 'sessions_revoked', reason: 'suspended', sessions: 2 })
    expect(lines).toHaveLength(1)
    expect(lines[0]).not.toContain('\n')
    const parsed = JSON.parse(lines[0]!)
    expect(parsed).toMatchObject({ account: 'ann@club.example', address: '192.0.2.7', outcome: 'sessions_revoked', reason: 'suspended', sessions: 2 })
    expect(Date.parse(parsed.time)).toBeGreaterThan(Date.now() - 60_000)
  })
})
