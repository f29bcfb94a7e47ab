// Order matters in both tables: Edge and Opera also claim Chrome, Chrome also claims Safari,
// and Android also claims Linux, so the more specific names come first.
const BROWSERS: [RegExp, string][] = [
  [/Edg(e|A|iOS)?\//, 'Edge'],
  [/OPR\/|Opera/, 'Opera'],
  [/Firefox\/|FxiOS\//, 'Firefox'],
  [/Chrome\/|CriOS\/|Chromium\//, 'Chrome'],
  [/Safari\//, 'Safari'],
  [/^curl\//, 'curl'],
]
const SYSTEMS: [RegExp, string][] = [
  [/iPhone/, 'iPhone'],
  [/iPad/, 'iPad'],
  [/Android/, 'Android'],
  [/Windows/, 'Windows'],
  [/CrOS/, 'ChromeOS'],
  [/Mac OS X|Macintosh/, 'macOS'],
  [/Linux/, 'Linux'],
]

const firstMatch = (table: [RegExp, string][], ua: string) => table.find(([pattern]) => pattern.test(ua))?.[1] ?? null

/**
 * A browser's User-Agent header in a few words for the list of my sessions: "Firefox on Windows",
 * "Safari on iPhone", "Chrome on Android". Only well-known browsers and systems are named; a header
 * naming neither is "Unknown browser".
 */
export function describeUserAgent(userAgent: string | null | undefined): string {
  const ua = userAgent ?? ''
  const browser = firstMatch(BROWSERS, ua)
  const system = firstMatch(SYSTEMS, ua)
  if (!browser && !system) return 'Unknown browser'
  return `${browser ?? 'Unknown browser'} on ${system ?? 'an unknown system'}`
}
