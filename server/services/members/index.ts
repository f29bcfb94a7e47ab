// The members domain's public surface: routes and other domains import from here, never from its files.
export * from './actions'
export * from './directory'
export * from './members'
export * from './standing'
export * from './status-sql'
export * from './dashboard-cards'
