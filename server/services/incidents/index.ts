// The incidents domain's public surface: reporting (which quarantines the vessel named), reading with
// the personal-details rule, the safety officer's review, closing and tier suspension, the notices, and the report form's look-ups.
export * from './access'
export * from './read'
export * from './report'
export * from './review'
export * from './notices'
export * from './lookups'
