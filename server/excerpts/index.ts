// Excerpts: the managed list of passages that clips play.
export { excerptRoutes } from './routes'
