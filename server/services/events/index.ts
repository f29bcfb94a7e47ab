// The events domain's public surface: fill stations and their gauges, launch events with their
// registrations and staff, the fill log as the event page and a member's history read it, the roster.
export * from './fill-stations'
export * from './events'
export * from './registrations'
export * from './fill-log'
export * from './roster'
