// The vessels domain's public surface: routes and other domains import from here, never from its files.
export * from './distance-rule'
export * from './registry'
export * from './label'
