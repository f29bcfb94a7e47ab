import { describe, expect, it } from 'vitest'
import {
  erasureNeedles, escapeRegExp, htmlSpellings, isErasedEmail, needlePattern, pseudonymEmail, pseudonymName, scrubText,
} from '../../../shared/utils/pseudonym'

const ID = '3f9a2c1b-0d4e-4a5b-8c6d-7e8f9a0b1c2d'

describe('pseudonyms', () => {
  it('name the membership by the first eight hex digits of its id, in capitals', () => {
    expect(pseudonymName(ID)).toBe('Erased member 3F9A2C1B')
  })

  it('give an unroutable e-mail under .invalid that the erase action recognises', () => {
    expect(pseudonymEmail(ID)).toBe('erased-3f9a2c1b-0d4e-4a5b-8c6d-7e8f9a0b1c2d@erased.invalid')
    expect(isErasedEmail(pseudonymEmail(ID))).toBe(true)
    expect(isErasedEmail('erased@club.example')).toBe(false)
  })
})

describe('htmlSpellings', () => {
  it.each([
    ['Ann Lee', ['Ann Lee']],
    ['Siobhán O\'Neill', ['Siobhán O\'Neill', 'Siobhán O&#39;Neill', 'Siobhán O&#x27;Neill', 'Siobhán O&apos;Neill']],
    ['Tom & Jo', ['Tom & Jo', 'Tom &amp; Jo']],
  ])('%s is searched as %j', (text, expected) => {
    expect(htmlSpellings(text)).toEqual(expected)
  })
})

describe('erasureNeedles', () => {
  it('drops blanks, short values and repeats in any case, longest first', () => {
    expect(erasureNeedles(['Ann Lee', '  ', null, undefined, 'Al', 'ANN LEE', 'ann.lee@club.example', '+44 7700 900123']))
      .toEqual(['ann.lee@club.example', '+44 7700 900123', 'Ann Lee'])
  })

  it('adds the HTML spellings of a name with an apostrophe', () => {
    expect(erasureNeedles(['Jo O\'Hara'])).toContain('Jo O&#39;Hara')
  })
})

describe('escapeRegExp and needlePattern', () => {
  it('escape every character a pattern gives a meaning to', () => {
    expect(escapeRegExp('+44 (0) 7700.900*1?')).toBe('\\+44 \\(0\\) 7700\\.900\\*1\\?')
  })

  it('join needles into one alternation, or none for no needles', () => {
    expect(needlePattern(['a+b', 'c.d'])).toBe('a\\+b|c\\.d')
    expect(needlePattern([])).toBeNull()
  })
})

describe('scrubText', () => {
  const needles = erasureNeedles(['Ann Lee', 'ann.lee@club.example', '+44 7700 900123', 'Jo O\'Hara'])

  it.each([
    ['Ann Lee burst a bottle; ann LEE was unhurt.', 'P burst a bottle; P was unhurt.'],
    ['Call +44 7700 900123 or write to Ann.Lee@club.example', 'Call P or write to P'],
    ['Guardian: Jo O&#39;Hara', 'Guardian: P'],
    ['Nothing personal here', 'Nothing personal here'],
  ])('%s → %s', (text, expected) => {
    expect(scrubText(text, needles, 'P')).toBe(expected)
  })

  it('keeps null and leaves text alone without needles', () => {
    expect(scrubText(null, needles, 'P')).toBeNull()
    expect(scrubText('Ann Lee', [], 'P')).toBe('Ann Lee')
  })
})
