/**
 * How a code (a status, an audit action) is put on screen: a short label, and the one sentence that
 * says what it means (shown as a hint or a title). Each list of codes keeps its words beside it in
 * `shared/utils/` — membership-status.ts, notice-status.ts, audit-actions.ts — and pages and server
 * take them from there, never from a copy.
 */
export interface Words {
  label: string
  meaning: string
}
