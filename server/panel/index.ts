// The panel of players: members, their instruments, level, region and consent, CSV import, and
// deletion on request with ratings kept under a pseudonymous code.
export { panelRoutes } from './routes'
