import { NOTICE_KINDS, type NoticeKind, type NoticeKindName, type NoticeVars, type RenderedNotice } from './kinds'

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, c => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', '\'': '&#39;' })[c]!)

/** The HTML part of a notice: the same lines as the text part, an action button, and the opt-out link. */
export function renderNoticeHtml(notice: RenderedNotice, vars: NoticeVars): string {
  const paragraphs = notice.lines.map(l => `<p style="margin:0 0 12px">${escapeHtml(l)}</p>`).join('')
  const action = notice.action
    ? `<p style="margin:20px 0"><a href="${escapeHtml(notice.action.url)}" style="background:#1f5a4b;color:#fff;padding:10px 16px;border-radius:8px;text-decoration:none;font-weight:600">${escapeHtml(notice.action.label)}</a></p>`
    + `<p style="margin:0 0 12px;font-size:13px;color:#3d4a47">Or open this address: ${escapeHtml(notice.action.url)}</p>`
    : ''
  const optOut = vars.optOutUrl
    ? `<p style="margin-top:24px;font-size:12px;color:#56625f"><a href="${escapeHtml(vars.optOutUrl)}" style="color:#1f5a4b">Stop these e-mails</a></p>`
    : ''
  return `<!doctype html><html lang="en"><body style="font-family:'Work Sans',Arial,sans-serif;color:#16211f;background:#f6f3ea;padding:24px">`
    + `<div style="max-width:560px;margin:auto;background:#fff;border:1px solid #cfc6ae;border-radius:12px;padding:24px">`
    + `<p style="margin:0 0 16px;font-weight:700;color:#1f5a4b">${escapeHtml(vars.clubName)} · Hoopwise</p>`
    + paragraphs + action + optOut + '</div></body></html>'
}

export interface ComposedNotice { subject: string, text: string, html: string }

/**
 * Renders one notice of `kind` to its subject, text and HTML parts. `optOutUrl` is used only when
 * the kind is optional (safety kinds never carry an opt-out link, whatever the caller passes).
 */
export function composeNotice(kind: NoticeKindName, vars: NoticeVars, optOutUrl?: string): ComposedNotice {
  const def: NoticeKind = NOTICE_KINDS[kind]
  const full: NoticeVars = { ...vars, optOutUrl: def.optional ? optOutUrl : undefined }
  const rendered = def.render(full)
  const text = full.optOutUrl ? `${rendered.text}\n\n--\nStop these e-mails: ${full.optOutUrl}` : rendered.text
  return { subject: rendered.subject, text, html: renderNoticeHtml(rendered, full) }
}
