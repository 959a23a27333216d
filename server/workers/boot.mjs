// A worker thread starts here: Node does not read TypeScript by itself, so the loader the
// server runs under is registered first and the task table is loaded through it.
import { register } from 'tsx/esm/api'

register()
await import('./tasks.ts')
