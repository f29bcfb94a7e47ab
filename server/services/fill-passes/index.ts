// The fill-pass domain's public surface: routes and other domains import from here, never from its files.
export * from './token'
export * from './passes'
