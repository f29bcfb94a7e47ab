// The dues domain's public surface: plans, card checkouts through the payment SDK, the payment
// service's events, offline payments and refunds, receipts, the admin's reports and the reminders.
export * from './admin'
export * from './checkout'
export * from './events'
export * from './ledger'
export * from './plans'
export * from './provider'
export * from './receipts'
export * from './reminders'
export * from './reports'
