// The DTOs live in one file per domain (shared/types/<domain>.ts); import from there. This file
// re-exports them all for code written before the split.
export type * from './common'
export type * from './clubs'
export type * from './members'
export type * from './waivers'
export type * from './notices'
export type * from './audit'
export type * from './dashboard'
export type * from './vessels'
