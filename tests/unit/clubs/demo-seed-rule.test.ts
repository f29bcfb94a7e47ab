import { describe, expect, it } from 'vitest'
import { demoWanted, databaseUrls } from '../../../scripts/lib/setup.mjs'
import { tagPrefixFor } from '../../../server/database/first-admin'

describe('demoWanted: the demo club only on the private cluster or on request, never in production', () => {
  it.each([
    [true, {}, true],
    [true, { HOOPWISE_DEMO: '1' }, true],
    [true, { NODE_ENV: 'production' }, false],
    [true, { NODE_ENV: 'production', HOOPWISE_DEMO: '1' }, false],
    [false, {}, false],
    [false, { HOOPWISE_DEMO: '0' }, false],
    [false, { HOOPWISE_DEMO: 'yes' }, false],
    [false, { HOOPWISE_DEMO: '1' }, true],
    [false, { HOOPWISE_DEMO: '1', NODE_ENV: 'production' }, false],
    [false, { NODE_ENV: 'development', HOOPWISE_DEMO: '1' }, true],
  ])('private cluster %s, %o → %s', (privateCluster, env, seeded) => {
    expect(demoWanted({ privateCluster, env })).toBe(seeded)
  })
})

describe('databaseUrls: which role migrates and which the app uses', () => {
  const cluster = { ownerUrl: 'postgres://owner@h/db', appUrl: 'postgres://app@h/db' }

  it.each([
    [{}, { databaseUrl: cluster.appUrl, ownerUrl: cluster.ownerUrl, privateCluster: true }],
    [{ NUXT_DATABASE_URL: 'postgres://a@x/y' }, { databaseUrl: 'postgres://a@x/y', ownerUrl: 'postgres://a@x/y', privateCluster: false }],
    [{ NUXT_DATABASE_URL: 'postgres://a@x/y', NUXT_DATABASE_OWNER_URL: 'postgres://o@x/y' },
      { databaseUrl: 'postgres://a@x/y', ownerUrl: 'postgres://o@x/y', privateCluster: false }],
  ])('%o', (env, urls) => {
    expect(databaseUrls({ env, cluster })).toEqual(urls)
  })

  it('refuses an owner address without the app\'s', () => {
    expect(() => databaseUrls({ env: { NUXT_DATABASE_OWNER_URL: 'postgres://o@x/y' }, cluster })).toThrow(/NUXT_DATABASE_URL/)
  })
})

describe('tagPrefixFor: a new club\'s tag prefix from its name (2–5 capital letters, as clubs.tag_prefix checks)', () => {
  it.each([
    ['Estuary Rocketry Club', 'ERC'],
    ['saltmarsh rocketry guild', 'SRG'],
    ['Rocketeers', 'ROCKE'],
    ['Île-de-Loire Water Rocket Society of Amateurs', 'IWRSO'],
    ['Q', 'QX'],
    ['42', 'XX'],
  ])('%s → %s', (name, prefix) => {
    expect(tagPrefixFor(name)).toBe(prefix)
    expect(prefix).toMatch(/^[A-Z]{2,5}$/)
  })
})
