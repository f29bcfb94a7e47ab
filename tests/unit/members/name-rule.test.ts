import { describe, expect, it } from 'vitest'
import type { ZodTypeAny } from 'zod'
import { nameField, nameIssue, optionalName } from '../../../shared/schemas/common'
import { SignupSchema } from '../../../shared/schemas/auth'
import { MemberEditSchema, ProfileSchema } from '../../../shared/schemas/member'
import { WaiverAcceptSchema } from '../../../shared/schemas/waiver'

// Names that read as one thing and are another, or break a line: refused by every form that takes a name.
const BAD_NAMES: [string, string][] = [
  ['a line break', 'Anselm\nBrackwater'],
  ['a carriage return', 'Anselm\rBrackwater'],
  ['a tab', 'Anselm\tBrackwater'],
  ['a right-to-left override (U+202E)', 'Anselm \u202EretawkcarB'],
  ['a left-to-right embedding (U+202A)', '\u202AAnselm Brackwater'],
  ['a right-to-left isolate (U+2067)', 'Anselm \u2067Brackwater\u2069'],
  ['a first-strong isolate (U+2068)', 'Anselm \u2068Brackwater'],
  ['an Arabic letter mark (U+061C)', 'Anselm\u061C Brackwater'],
  ['a zero-width space (U+200B)', 'Ansel\u200Bm Brackwater'],
  ['a zero-width non-joiner (U+200C)', 'Anselm\u200C Brackwater'],
  ['a zero-width joiner (U+200D)', 'Ans\u200Delm Brackwater'],
  ['a left-to-right mark (U+200E)', 'Anselm Brackwater\u200E'],
  ['a word joiner (U+2060)', 'Anselm\u2060Brackwater'],
  ['a byte-order mark inside (U+FEFF)', 'Anselm\uFEFFBrackwater'],
  ['a soft hyphen (U+00AD)', 'Brack\u00ADwater'],
  ['a line separator (U+2028)', 'Anselm\u2028Brackwater'],
  ['a paragraph separator (U+2029)', 'Anselm\u2029Brackwater'],
  ['a NUL', 'Anselm\u0000'],
  ['a DEL', 'Anselm\u007F'],
  ['a C1 control (U+0085, next line)', 'Anselm\u0085Brackwater'],
  ['a private-use character', 'Anselm \uE000'],
  ['a Hangul filler (a blank letter)', '\u3164'],
  ['a braille blank', 'Anselm \u2800 Brackwater'],
  ['marks stacked over a letter', 'Ans\u0301\u0302\u0303\u0304elm'],
  ['no letter at all', '1234 !!'],
]

const GOOD_NAMES: [string, string][] = [
  ['a plain name', 'Anselm Brackwater'],
  ['an apostrophe and a hyphen', 'Siobhán O\'Neill-Hart'],
  ['accents', 'Zoë Ångström'],
  ['a right-to-left script', 'ليلى حداد'],
  ['Han characters', '李小龍'],
  ['Devanagari with its marks', 'अनुष्का शर्मा'],
  ['Vietnamese (two marks on one letter)', 'Nguyễn Thị Thu'],
  ['a single letter', 'Q'],
  ['a generational suffix and digits', 'Henry Tidewell III, 2nd'],
]

describe('the name rule (one printable line)', () => {
  it.each(BAD_NAMES)('refuses a name with %s', (_label, name) => {
    expect(nameIssue(name)).not.toBeNull()
    expect(nameField().safeParse(name).success).toBe(false)
    expect(optionalName().safeParse(name).success).toBe(false)
  })

  it.each(GOOD_NAMES)('accepts %s', (_label, name) => {
    expect(nameIssue(name)).toBeNull()
    expect(nameField().parse(name)).toBe(name.normalize('NFC'))
  })

  it('trims, stores normal form C and keeps the length limit', () => {
    expect(nameField().parse('  Zoe\u0308 Tidewell \n')).toBe('Zoë Tidewell')
    expect(nameField().safeParse('x'.repeat(121)).success).toBe(false)
    expect(nameField().parse('x'.repeat(120))).toHaveLength(120)
    expect(nameField('Type your full name').safeParse('   ').error?.issues[0]?.message).toBe('Type your full name')
    expect(optionalName().parse('  ')).toBeNull()
  })

  // Every form that takes a name uses the rule: a right-to-left override and a zero-width joiner in each.
  const valid = {
    signup: { name: 'Maren Tidewell', email: 'maren@club.example', password: 'long enough pass', birthDate: '1990-01-01' },
    profile: { name: 'Maren Tidewell', unitPreference: 'bar' },
    waiver: { version: 1, typedName: 'Maren Tidewell' },
  }
  it.each([
    ['sign-up name', SignupSchema, valid.signup, 'name'],
    ['sign-up guardian name', SignupSchema, valid.signup, 'guardianName'],
    ['profile name', ProfileSchema, valid.profile, 'name'],
    ['profile emergency contact', ProfileSchema, valid.profile, 'emergencyContactName'],
    ['member edit name', MemberEditSchema, {}, 'name'],
    ['member edit guardian name', MemberEditSchema, {}, 'guardianName'],
    ['waiver typed name', WaiverAcceptSchema, valid.waiver, 'typedName'],
  ] as [string, ZodTypeAny, Record<string, unknown>, string][])('the %s refuses hidden characters', (_label, schema, base, field) => {
    expect(schema.safeParse({ ...base, [field]: 'Maren Tidewell' }).success).toBe(true)
    for (const bad of ['Maren \u202ElewediT', 'Ma\u200Dren', 'Maren\nTidewell']) {
      const result = schema.safeParse({ ...base, [field]: bad })
      expect(result.success).toBe(false)
      expect(result.error?.issues.map(i => i.path.join('.'))).toContain(field)
    }
  })
})
