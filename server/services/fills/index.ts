// The fills domain's public surface: routes and other domains import from here, never from its files.
export * from './facts'
export * from './gate'
export * from './desk'
export * from './reservations'
export * from './snapshots'
export * from './sync'
