// Outgoing mail: the outbox (claims before sending, retries, a session's mail waiting while the
// session is open, stopping), the SMTP transport with its timeouts, the local mail catcher for
// development, mail templates, and the admin's Mail page.
export { mailRoutes } from './routes'
