/**
 * Pseudonyms for an erased member, and the search for what must go. An erased member's records stay
 * (payments, fills, proof tests, tier sign-offs, incidents), attached to a pseudonym built from the
 * membership's random id: it names no one and cannot be turned back into the person.
 */

/** The shortest text searched for and replaced: shorter needles would hit ordinary words. */
export const MIN_NEEDLE_LENGTH = 3

/** The erased member's name from now on, e.g. "Erased member 3F9A2C1B" (the membership id's first 8 hex digits). */
export function pseudonymName(membershipId: string): string {
  return `Erased member ${membershipId.replace(/-/g, '').slice(0, 8).toUpperCase()}`
}

/** The erased account's e-mail: unique, unroutable (`.invalid` is reserved), so the real one can sign up afresh. */
export function pseudonymEmail(membershipId: string): string {
  return `erased-${membershipId.toLowerCase()}@erased.invalid`
}

const HTML_ESCAPES: [RegExp, string[]][] = [
  [/&/g, ['&amp;']],
  [/'/g, ['&#39;', '&#x27;', '&apos;']],
  [/"/g, ['&quot;', '&#34;']],
  [/</g, ['&lt;']],
  [/>/g, ['&gt;']],
]

/** `text` as the e-mail templates may have written it into HTML: every spelling of its escaped characters. */
export function htmlSpellings(text: string): string[] {
  let spellings = [text]
  for (const [char, escapes] of HTML_ESCAPES) {
    if (!char.test(text)) continue
    spellings = spellings.flatMap(s => [s, ...escapes.map(e => s.replace(char, e))])
  }
  return [...new Set(spellings)]
}

/**
 * What to search for: each personal value (name, e-mail, phone, guardian's and emergency contact's)
 * trimmed, with its HTML spellings, without blanks and values shorter than MIN_NEEDLE_LENGTH, longest
 * first (so "Ann Lee" goes before "Ann" would), without repeats whatever their case.
 */
export function erasureNeedles(values: readonly (string | null | undefined)[]): string[] {
  const seen = new Set<string>()
  const out: string[] = []
  for (const value of values) {
    const trimmed = value?.trim()
    if (!trimmed || trimmed.length < MIN_NEEDLE_LENGTH) continue
    for (const spelling of htmlSpellings(trimmed)) {
      if (seen.has(spelling.toLowerCase())) continue
      seen.add(spelling.toLowerCase())
      out.push(spelling)
    }
  }
  return out.sort((a, b) => b.length - a.length)
}

/** `text` with the characters a regular expression gives a meaning to escaped (JS and PostgreSQL alike). */
export function escapeRegExp(text: string): string {
  return text.replace(/[\\^$.|?*+()[\]{}]/g, '\\$&')
}

/** One case-insensitive alternation of `needles` (for JS `new RegExp(p, 'gi')` and PostgreSQL `~*`), or null when none. */
export function needlePattern(needles: readonly string[]): string | null {
  return needles.length ? needles.map(escapeRegExp).join('|') : null
}

/** `text` with every needle (any case) replaced by `pseudonym`; null and undefined stay as they are. */
export function scrubText<T extends string | null | undefined>(text: T, needles: readonly string[], pseudonym: string): T {
  const pattern = needlePattern(needles)
  if (text == null || !pattern) return text
  return text.replace(new RegExp(pattern, 'gi'), pseudonym) as T
}

/** Whether `email` is an erased account's pseudonymous e-mail (pages hide the erase action then). */
export function isErasedEmail(email: string): boolean {
  return /^erased-[0-9a-f-]{36}@erased\.invalid$/.test(email)
}
