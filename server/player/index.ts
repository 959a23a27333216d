// The player's side: the invitation landing, consent, headphone and level checks, the plan in
// blind codes, audio under opaque addresses, and saving answers. Everything here is blind.
export { playerRoutes } from './landingRoutes'
export { playerFlowRoutes } from './routes'
