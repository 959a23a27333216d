// Outgoing mail: the outbox with retries, the SMTP transport, the local mail catcher for
// development, mail templates, and the admin's Mail page.
export { mailRoutes } from './routes'
