// The accounts domain's public surface: routes and other domains import from here, never from its files.
export * from './accounts'
export * from './known-device'
export * from './password-hashing'
export * from './passwords'
export * from './semaphore'
export * from './sessions'
export * from './sign-in-limits'
export * from './tokens'
