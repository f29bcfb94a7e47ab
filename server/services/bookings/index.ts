// The bookings domain's public surface (workshop stations, bookings, the calendar feed): import from here.
export * from './rules'
export * from './stations'
export * from './bookings'
export * from './feed'
