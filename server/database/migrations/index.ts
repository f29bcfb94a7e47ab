// Every migration, listed explicitly in order: a glob finds nothing inside the built server.
import * as m0001 from './0001-foundation'

export const migrations = [
  { name: '0001-foundation', ...m0001 },
]
