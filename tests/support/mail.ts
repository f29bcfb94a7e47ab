// Reads the mail catcher's REST listing (maildev's /api/email) so tests can follow e-mailed links.
import { testEnv } from './test-env'

export interface CaughtMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string }[]
  date: string
}

/** Every message the catcher holds for `address` (case-insensitive), oldest first. */
export async function mailsTo(address: string, mailUrl = testEnv.mailUrl): Promise<CaughtMail[]> {
  const res = await fetch(`${mailUrl}/api/email`)
  const all = (await res.json()) as CaughtMail[]
  return all.filter(m => m.to.some(t => t.address.toLowerCase() === address.toLowerCase()))
}

/** Waits until a message to `address` whose subject matches arrives; returns the newest such message. */
export async function waitForMail(address: string, subject: RegExp, { timeoutMs = 15_000, mailUrl = testEnv.mailUrl } = {}): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const found = (await mailsTo(address, mailUrl)).filter(m => subject.test(m.subject))
    if (found.length) return found[found.length - 1]!
    await new Promise(r => setTimeout(r, 200))
  }
  throw new Error(`no mail to ${address} matching ${subject} within ${timeoutMs} ms`)
}

/** The first link in a message's text part that starts with `prefix` (e.g. the site's address + '/verify'). */
export function linkIn(mail: CaughtMail, pathPrefix: string): URL {
  const match = mail.text.match(/https?:\/\/\S+/g)?.map(u => new URL(u)).find(u => u.pathname.startsWith(pathPrefix))
  if (!match) throw new Error(`no ${pathPrefix} link in "${mail.subject}"`)
  return match
}
