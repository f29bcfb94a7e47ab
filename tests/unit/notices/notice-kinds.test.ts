import { describe, it, expect } from 'vitest'
import { NOTICE_KINDS, isNoticeKind, longDate, optionalNoticeKinds, type NoticeKindName, type NoticeVars } from '../../../server/services/notices/kinds'
import { composeNotice } from '../../../server/services/notices/render'
import { deriveOptOutKey, optOutToken, optOutUrl, oneClickOptOutUrl, readOptOutToken } from '../../../server/services/notices/opt-out'
import { backoffSeconds, classifySendError, statusAfterFailure, MAX_ATTEMPTS } from '../../../server/services/notices/delivery'

const BASE = 'https://rockets.saltmarsh.example'
const KINDS = Object.keys(NOTICE_KINDS) as NoticeKindName[]
const SECRET = 'unit-test-secret-that-is-long-enough-000'
const MEMBER = '6f1c1d52-3a7e-4c38-9d9e-3d1f0c2b7a11'

function varsFor(baseUrl: string): NoticeVars {
  return {
    clubName: 'Saltmarsh Rocketry Guild',
    memberName: 'Odile Marshcombe',
    baseUrl,
    actionUrl: `${baseUrl}/action?token=abc`,
    guardianName: 'Guardian of Odile',
    paidThrough: '2026-03-14',
    vesselTag: 'SRG-0042',
    vesselName: 'Gull',
    validThrough: '2026-04-30',
    courseName: 'Composite handling and PPE',
    courseCode: 'composite_ppe',
    expiresOn: '2026-05-20',
    daysBefore: 30,
    startsAt: 'Saturday 2 May 2026 at 10:00',
    place: 'Workshop, laminating bay',
    sessionId: '0b6a3c1e-5d2f-4e8a-9c7b-1a2b3c4d5e6f',
    stationName: 'Laminating bench A',
    startsText: '14 Mar 2026, 10:00',
    endsText: '14 Mar 2026, 12:00',
    tierCode: 'T2',
    tierName: 'Reinforced',
    reason: 'Filled above the event cap',
    eventId: '1c2d3e4f-5a6b-4c7d-8e9f-0a1b2c3d4e5f',
    eventSite: 'Saltings north flat',
    fromDate: '2026-05-09',
    toDate: '2026-05-16',
    eventDate: '2026-05-09',
    reasonText: 'Gale forecast',
    kindLabel: 'Burst',
    happenedOn: '2026-05-09',
    reporterName: 'Wren Gullyhaven',
    incidentId: '2d3e4f5a-6b7c-4d8e-9f0a-1b2c3d4e5f6a',
    outcome: 'Pin replaced on pad 2',
  }
}

const linksIn = (s: string) => s.match(/https?:\/\/[^\s"<>]+/g) ?? []

describe('every notice kind renders subject, text and HTML from the club address', () => {
  it.each(KINDS)('%s', (kind) => {
    const optOut = optOutUrl(SECRET, BASE, MEMBER, kind)
    const n = composeNotice(kind, varsFor(BASE), optOut)
    expect(n.subject.length).toBeGreaterThan(5)
    expect(n.subject).not.toMatch(/undefined|null|\[object/)
    expect(n.text).toContain('Odile Marshcombe')
    expect(n.html).toContain('Odile Marshcombe')
    expect(n.html).toMatch(/^<!doctype html>/)
    for (const part of [n.subject, n.text, n.html]) {
      expect(part).not.toMatch(/undefined|localhost|127\.0\.0\.1/)
      for (const link of linksIn(part)) expect(link.startsWith(BASE)).toBe(true)
    }
    // Kinds with an action carry its link in both parts.
    if (n.text.includes('/action?token=abc')) expect(n.html).toContain(`${BASE}/action?token=abc`)
  })

  it('follows a localhost address only when the club is configured with one', () => {
    const n = composeNotice('signup_approved', varsFor('http://localhost:3000'))
    expect(linksIn(n.text)).toEqual(['http://localhost:3000/standing'])
  })

  it('escapes member-supplied text in the HTML part', () => {
    const n = composeNotice('password_reset', { ...varsFor(BASE), memberName: '<img src=x onerror=alert(1)>' })
    expect(n.html).not.toContain('<img src=x')
    expect(n.html).toContain('&lt;img src=x onerror=alert(1)&gt;')
  })

  it('tells of a training record expiring, with the fit test\'s own words, and of a place on a session', () => {
    expect(composeNotice('training_expiring', varsFor(BASE)).subject).toBe('Your Composite handling and PPE record expires on 20 May 2026')
    expect(composeNotice('training_expiring', { ...varsFor(BASE), courseName: 'Respirator fit test', courseCode: 'respirator_fit' }).text).toMatch(/at least every 12 months/)
    const moved = composeNotice('training_moved_up', varsFor(BASE), optOutUrl(SECRET, BASE, MEMBER, 'training_moved_up'))
    expect(moved.text).toMatch(/sensitise skin/)
    expect(moved.text).toContain(`${BASE}/training/sessions/`)
  })

  it('tells registered members of a moved or cancelled launch event, with its site, days and reason', () => {
    const moved = composeNotice('launch_event_moved', varsFor(BASE))
    expect(moved.subject).toBe('Moved: the launch at Saltings north flat is now on 16 May 2026')
    expect(moved.text).toContain('from 9 May 2026 to 16 May 2026')
    expect(moved.text).toContain(`${BASE}/events/1c2d3e4f-5a6b-4c7d-8e9f-0a1b2c3d4e5f`)
    const cancelled = composeNotice('launch_event_cancelled', varsFor(BASE))
    expect(cancelled.subject).toBe('Cancelled: the launch at Saltings north flat on 9 May 2026')
    expect(cancelled.text).toContain('The reason: Gale forecast')
    expect(NOTICE_KINDS.launch_event_moved.optional).toBe(false)
    expect(NOTICE_KINDS.launch_event_cancelled.optional).toBe(false)
  })

  it('shows dues dates in words', () => {
    expect(longDate('2026-03-14')).toBe('14 March 2026')
    expect(longDate('2028-12-01')).toBe('1 December 2028')
    expect(composeNotice('dues_reminder', varsFor(BASE)).subject).toBe('Your Saltmarsh Rocketry Guild dues run out on 14 March 2026')
  })
})

describe('opt-out links', () => {
  const optional = optionalNoticeKinds()
  const safety = KINDS.filter(k => !NOTICE_KINDS[k].optional)

  it('has optional kinds and safety kinds', () => {
    expect(optional).toContain('dues_reminder')
    expect(safety).toEqual(expect.arrayContaining(['email_verification', 'password_reset', 'guardian_consent', 'signup_approved']))
  })

  it.each(optional)('optional kind %s carries its opt-out link in text and HTML', (kind) => {
    const link = optOutUrl(SECRET, BASE, MEMBER, kind)
    const n = composeNotice(kind, varsFor(BASE), link)
    expect(link.startsWith(`${BASE}/opt-out?token=`)).toBe(true)
    expect(n.text).toContain(`Stop these e-mails: ${link}`)
    expect(n.html).toContain(link.replace(/&/g, '&amp;'))
  })

  it.each(safety)('safety kind %s never carries an opt-out link, even when one is passed', (kind) => {
    const n = composeNotice(kind, varsFor(BASE), optOutUrl(SECRET, BASE, MEMBER, kind))
    expect(n.text).not.toContain('/opt-out')
    expect(n.html).not.toContain('/opt-out')
    expect(n.text).not.toContain('Stop these e-mails')
  })
})

describe('opt-out tokens', () => {
  it('sign and verify', () => {
    const token = optOutToken(SECRET, MEMBER, 'dues_reminder')
    expect(readOptOutToken(SECRET, token)).toEqual({ membershipId: MEMBER, kind: 'dues_reminder' })
    const url = new URL(oneClickOptOutUrl(SECRET, BASE, MEMBER, 'dues_reminder'))
    expect(url.pathname).toBe('/api/notices/opt-out')
    expect(readOptOutToken(SECRET, url.searchParams.get('token')!)).toEqual({ membershipId: MEMBER, kind: 'dues_reminder' })
  })

  it('refuses a token signed with another secret', () => {
    expect(readOptOutToken(SECRET, optOutToken('another-secret-another-secret-0000', MEMBER, 'dues_reminder'))).toBeNull()
  })

  it.each([
    ['another member', (t: string) => t.replace(MEMBER, '00000000-0000-4000-8000-000000000000')],
    ['another kind', (t: string) => t.replace('.dues_reminder.', '.password_reset.')],
    ['a changed signature', (t: string) => t.slice(0, -2) + (t.endsWith('AA') ? 'BB' : 'AA')],
    ['a cut signature', (t: string) => t.slice(0, -5)],
    ['an extra part', (t: string) => `${t}.more`],
    ['no signature', (t: string) => t.split('.').slice(0, 2).join('.')],
    ['nothing', () => ''],
  ])('refuses a token with %s', (_, tamper) => {
    expect(readOptOutToken(SECRET, tamper(optOutToken(SECRET, MEMBER, 'dues_reminder')))).toBeNull()
  })
})

describe('retry policy', () => {
  it.each([
    [1, 30], [2, 60], [3, 120], [4, 240], [5, 480], [6, 960], [7, 1920], [8, 3840], [9, 7680], [10, 15360],
    [11, 21600], [20, 21600], [100, 21600], [0, 30],
  ])('after %i failed attempts waits %i s', (attempts, seconds) => {
    expect(backoffSeconds(attempts)).toBe(seconds)
  })

  it.each([
    ['a refused connection', Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:1026'), { code: 'ESOCKET' }), 'unreachable'],
    ['a dropped connection', Object.assign(new Error('Connection closed unexpectedly'), { code: 'ECONNECTION' }), 'unreachable'],
    ['an unknown host', Object.assign(new Error('getaddrinfo ENOTFOUND smtp.nowhere.example'), { code: 'EDNS' }), 'unreachable'],
    ['a failed TLS upgrade', Object.assign(new Error('Error upgrading connection with STARTTLS'), { code: 'ETLS' }), 'unreachable'],
    ['a connect timeout', Object.assign(new Error('Connection timeout'), { code: 'ETIMEDOUT', timeoutType: 'CONNECT_TIMEOUT' }), 'unreachable'],
    ['no greeting', Object.assign(new Error('Greeting never received'), { code: 'ETIMEDOUT', timeoutType: 'GREETING_TIMEOUT' }), 'unreachable'],
    ['a timeout mid-conversation', Object.assign(new Error('Timeout'), { code: 'ETIMEDOUT', timeoutType: 'SOCKET_TIMEOUT' }), 'transient'],
    ['a refused sign-in (535)', Object.assign(new Error('Invalid login'), { code: 'EAUTH', responseCode: 535 }), 'transient'],
    ['a refused sign-in without a reply', Object.assign(new Error('Invalid login'), { code: 'EAUTH' }), 'transient'],
    ['a busy mailbox (451)', Object.assign(new Error('Try later'), { code: 'EENVELOPE', responseCode: 451 }), 'transient'],
    ['no such mailbox (550)', Object.assign(new Error('No such user'), { code: 'EENVELOPE', responseCode: 550 }), 'permanent'],
    ['a rejected message (554)', Object.assign(new Error('Rejected'), { code: 'EMESSAGE', responseCode: 554 }), 'permanent'],
    ['a broken message stream', Object.assign(new Error('stream failed'), { code: 'ESTREAM' }), 'transient'],
    ['something odd', 'not an error', 'transient'],
  ])('classifies %s', (_, error, kind) => {
    expect(classifySendError(error)).toBe(kind)
  })

  it('keeps retrying while the server is unreachable, gives up on 4xx after the cap and on 5xx at once', () => {
    expect(statusAfterFailure('unreachable', 1)).toBe('queued')
    expect(statusAfterFailure('unreachable', 500)).toBe('queued')
    expect(statusAfterFailure('transient', MAX_ATTEMPTS - 1)).toBe('queued')
    expect(statusAfterFailure('transient', MAX_ATTEMPTS)).toBe('failed')
    expect(statusAfterFailure('permanent', 1)).toBe('failed')
    expect(MAX_ATTEMPTS).toBe(10)
  })
})

describe('kind names', () => {
  it('match the database check and are known', () => {
    for (const kind of KINDS) {
      expect(kind).toMatch(/^[a-z_]{2,60}$/)
      expect(isNoticeKind(kind)).toBe(true)
    }
    expect(isNoticeKind('toString')).toBe(false)
    expect(isNoticeKind('no_such_kind')).toBe(false)
  })
})

describe('deriveOptOutKey', () => {
  it('derives a key of its own from the session secret: stable, and never the secret itself', () => {
    const secret = 'a-session-secret-of-at-least-32-characters'
    expect(deriveOptOutKey(secret)).toBe(deriveOptOutKey(secret))
    expect(deriveOptOutKey(secret)).not.toBe(secret)
    expect(deriveOptOutKey(secret)).not.toBe(deriveOptOutKey(`${secret}!`))
    expect(deriveOptOutKey(secret)).toMatch(/^[0-9a-f]{64}$/)
  })
})
