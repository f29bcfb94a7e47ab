import { describe, expect, it } from 'vitest'
import { VesselRegistrationSchema, VesselListQuerySchema } from '../../../shared/schemas/vessel'
import { VESSEL_STATES, VESSEL_STATE_WORDS, vesselTag } from '../../../shared/utils/vessel-states'

const bottle = { name: 'Gull', construction: 'single_bottle', volumeL: 2, diameterMm: 102 }
const laminate = { fibreClass: 'carbon', arealWeightGPerM2: 200, weave: 'hoop_tow', plies: 4 }

/** The fields a registration's errors name, sorted (empty when it is accepted). */
function refusedFields(input: unknown): string[] {
  const result = VesselRegistrationSchema.safeParse(input)
  return result.success ? [] : [...new Set(result.error.issues.map(i => i.path.join('.')))].sort()
}

describe('vesselTag', () => {
  it.each([
    ['SRG', 1, 'SRG-0001'],
    ['SRG', 42, 'SRG-0042'],
    ['AB', 9999, 'AB-9999'],
    ['ABCDE', 12345, 'ABCDE-12345'],
  ])('tags number %s %i as %s', (prefix, number, tag) => {
    expect(vesselTag(prefix, number)).toBe(tag)
  })
})

describe('VesselRegistrationSchema', () => {
  it.each([
    ['a plain bottle', bottle, []],
    ['a bottle with a laminate and resin', { ...bottle, ...laminate, resin: 'Epoxy', lastLayupOn: '2026-03-01' }, []],
    ['a mandrel tube with its laminate', { ...bottle, construction: 'mandrel_tube', ...laminate }, []],
    ['a mandrel tube without one', { ...bottle, construction: 'mandrel_tube' }, ['arealWeightGPerM2', 'fibreClass', 'plies', 'weave']],
    ['an overwrapped liner with half a laminate', { ...bottle, construction: 'overwrapped_liner', fibreClass: 'e_glass', weave: 'woven_0_90' }, ['arealWeightGPerM2', 'plies']],
    ['a resin and layup date without a laminate', { ...bottle, resin: 'Epoxy', lastLayupOn: '2026-03-01' }, ['lastLayupOn', 'resin']],
    ['zero volume, infinite diameter', { ...bottle, volumeL: 0, diameterMm: Number.POSITIVE_INFINITY }, ['diameterMm', 'volumeL']],
    ['a name on two lines', { ...bottle, name: 'Gull\nTwo' }, ['name']],
    ['a date that is not on the calendar', { ...bottle, ...laminate, lastLayupOn: '2026-02-30' }, ['lastLayupOn']],
  ])('%s → refused fields %j', (_label, input, fields) => {
    expect(refusedFields(input)).toEqual(fields)
  })
})

describe('vessel states and the list query', () => {
  it('has words for every stored state, and "retest due" is not one (it is derived)', () => {
    expect(Object.keys(VESSEL_STATE_WORDS).sort()).toEqual([...VESSEL_STATES].sort())
    expect(VESSEL_STATES).not.toContain('retest_due')
  })

  it('defaults to the first page sorted by tag, and refuses an unknown state', () => {
    expect(VesselListQuerySchema.parse({})).toMatchObject({ page: 1, pageSize: 25, sort: 'tag', dir: 'asc' })
    expect(VesselListQuerySchema.safeParse({ state: 'retest_due' }).success).toBe(false)
  })
})
