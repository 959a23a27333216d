// The audit log: who changed what and when, written in the same transaction as the change.
export { auditRoutes } from './routes'
