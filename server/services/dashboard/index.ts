// The dashboard domain's public surface: routes and other domains import from here, never from its files.
export * from './dashboard'
export * from './provider'
export * from './providers'
