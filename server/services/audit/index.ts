// The audit domain's public surface: routes and other domains import from here, never from its files.
export * from './record'
export * from './trail'
export * from './dashboard-cards'
export * from './desk'
export * from './evidence-pack'
