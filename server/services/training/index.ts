// The training domain's public surface: routes and other domains import from here, never from its files.
export * from './courses'
export * from './catalogue'
export * from './sessions'
export * from './assessment'
export * from './records'
export * from './evidence'
export * from './imported'
