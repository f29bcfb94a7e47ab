// Accessibility checks in the browser tests: axe-core (pinned in package.json) injected into a
// playwright-core page through the DevTools protocol, which the page's content security policy
// does not govern (a <script> tag would need the page's nonce).
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import type { Page } from 'playwright-core'

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8')

/** One rule broken on the page, with the elements that break it. */
export interface AxeViolation { id: string, impact: string | null, help: string, targets: string[] }

/**
 * The WCAG 2.2 A and AA (and best-practice) violations axe finds on `page` as it stands: an empty
 * list when there are none. Each is one line in a failure message through `describeViolations`.
 */
export async function axeViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(AXE_SOURCE)
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (context: Document, options: object) => Promise<{ violations: { id: string, impact: string | null, help: string, nodes: { target: string[] }[] }[] }> } }).axe
    const result = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'] } })
    return result.violations.map(v => ({ id: v.id, impact: v.impact, help: v.help, targets: v.nodes.map(n => n.target.join(' ')) }))
  })
}

/** Violations as readable lines for an assertion's message. */
export function describeViolations(violations: AxeViolation[]): string {
  return violations.map(v => `${v.id} (${v.impact}): ${v.help} — ${v.targets.slice(0, 5).join(', ')}`).join('\n')
}
