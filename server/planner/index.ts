// The planner: how many players a session needs for a given difference, SD, alpha and power.
export { plannerRoutes } from './routes'
