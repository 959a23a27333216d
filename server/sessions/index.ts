// Sessions: the designer and its review, open and close, the staff preview, aging time points,
// and the served record that fixes what every invited player is served.
export { sessionRoutes } from './routes'
