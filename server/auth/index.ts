// Sign-in for staff: e-mail and password, the session cookie, password reset and set-password
// links, the demo accounts' refusal in production, and the signing of players' invitation links.
export { authRoutes } from './routes'
