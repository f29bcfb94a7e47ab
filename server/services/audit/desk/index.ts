// The audit desk: counts, tables, CSV and charts for the safety officer (admins read it without injury details).
export * from './context'
export * from './tables'
export * from './charts'
