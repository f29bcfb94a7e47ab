// The club-data domain's public surface (roster imports): routes and other domains import from here.
export * from './csv'
export * from './jobs'
export * from './runner'
