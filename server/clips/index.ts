// Clips: uploads and CSV manifests, measures on upload, blind renditions level-matched per
// matched set, the clip library, and archiving of clips that sessions use.
export { clipRoutes } from './routes'
