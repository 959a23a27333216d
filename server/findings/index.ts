// Findings: a session's analysis read through the served record, exclusions, provenance, and
// the CSV exports.
export { findingsRoutes } from './routes'
