// The club-data domain's public surface: a member's data given back or erased.
export * from './erasure'
