// The tiers domain's public surface: routes and other domains import from here, never from its files.
export * from './levels'
export * from './held'
export * from './signoffs'
export * from './actions'
export * from './evidence'
export * from './expiring'
export * from './fill-pass-token'
export * from './fill-passes'
