/**
 * The launch-side fill page's pure helpers: reading what the phone's camera scanned, showing the
 * permitted maximum, and the cautions that stay on screen. The fill gate decides; these only show.
 */
import { barToPsi, type PressureUnit } from './units'

/** The fill-pass token inside a scanned code: a verify address (`…/verify/<token>`) or the bare token; null otherwise. */
export function tokenFromScan(text: string): string | null {
  const m = text.trim().match(/(?:^|\/verify\/)([A-Za-z0-9_-]{43})\/?(?:[?#].*)?$/)
  return m ? m[1]! : null
}

/** The vessel tag inside a scanned label: its page address (`…/vessels/<tag>`) or the bare tag, upper case; null otherwise. */
export function tagFromScan(text: string): string | null {
  const t = text.trim()
  const m = t.match(/\/vessels\/([A-Za-z]{2,5}-\d{4,})\/?(?:[?#].*)?$/) ?? t.match(/^([A-Za-z]{2,5}-\d{4,})$/)
  return m ? m[1]!.toUpperCase() : null
}

/**
 * A permitted maximum as the fill page shows it, always rounded DOWN: to 0.1 bar, or to 1 psi (a
 * limit shown a little low is safe, a little high is not). The tiny epsilon keeps 9.3 from showing as 9.2.
 */
export function formatPermittedMax(pressureBar: number, unit: PressureUnit): string {
  const floorTo = (value: number, step: number) => Math.floor(value / step + 1e-9) * step
  return unit === 'bar' ? `${floorTo(pressureBar, 0.1).toFixed(1)} bar` : `${floorTo(barToPsi(pressureBar), 1).toFixed(0)} psi`
}

/** The cautions the fill page always shows, whatever the answer. */
export const FILL_CAUTIONS: readonly string[] = [
  'Fill remotely: nobody holds or stands over a vessel under pressure.',
  'Eye protection for everyone at the pad.',
  'Keep at least the standoff shown. It is a minimum from an industrial code for pneumatic tests; the club\'s own rules may demand more.',
  'A GO is the club\'s records agreeing, not a safety clearance: the range officer and the club\'s rules decide.',
]
