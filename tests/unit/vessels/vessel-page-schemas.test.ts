import { describe, expect, it } from 'vitest'
import { VesselListQuerySchema, VesselTagParamSchema } from '../../../shared/schemas/vessel'
import { readQueryFilters, writeQueryFilters } from '../../../shared/utils/query-filters'

describe('a vessel tag in a page address', () => {
  it.each([
    ['SRG-0042', 'SRG-0042'],
    ['srg-0042', 'SRG-0042'],
    [' ab-12345 ', 'AB-12345'],
  ])('reads %j as %s', (raw, tag) => {
    expect(VesselTagParamSchema.parse({ tag: raw })).toEqual({ tag })
  })

  it.each(['SRG-', 'SRG-42', 'TOOLONG-0001', 'S-0001', 'SRG_0042', '../0042', ''])('refuses %j', (raw) => {
    expect(VesselTagParamSchema.safeParse({ tag: raw }).success).toBe(false)
  })
})

describe('the "proof lapsing in 30 days" filter of the vessel list', () => {
  it('travels in the URL as lapsing=1 and is absent otherwise', () => {
    const on = readQueryFilters(VesselListQuerySchema, { lapsing: '1', state: 'in_service' })
    expect(on).toMatchObject({ lapsing: '1', state: 'in_service' })
    expect(writeQueryFilters(VesselListQuerySchema, on)).toEqual({ lapsing: '1', state: 'in_service' })
    expect(readQueryFilters(VesselListQuerySchema, {}).lapsing).toBeUndefined()
  })

  it.each(['yes', 'true', '0'])('refuses lapsing=%s on the route', (value) => {
    expect(VesselListQuerySchema.safeParse({ lapsing: value }).success).toBe(false)
  })
})
