// Staff accounts: inviting colleagues, roles, deactivation (admins only).
export { staffRoutes } from './routes'
