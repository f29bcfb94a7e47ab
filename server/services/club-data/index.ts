// The club-data domain's public surface: exports, a member's own data (and the import and erasure beside them).
export * from './exports'
export * from './my-data'
