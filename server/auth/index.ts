// Sign-in for staff: e-mail and password, the session cookie and its sign-in record, the
// per-account throttle, changing one's own password, password reset and set-password links, the
// demo accounts' refusal in production, and the signing of players' invitation links.
export { authRoutes } from './routes'
