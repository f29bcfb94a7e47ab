// The club-data domain's public surface (roster imports, exports, a member's own data): routes and other domains import from here.
export * from './csv'
export * from './jobs'
export * from './runner'
export * from './exports'
export * from './my-data'
export * from './erasure'
