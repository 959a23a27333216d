// Sessions: their design, the staff views of them, invitations and what a player's link
// opens. Split by topic under sessions/; this file keeps every import of
// shared/schemas/sessions working.

export * from './sessions/attributes'
export * from './sessions/design'
export * from './sessions/details'
export * from './sessions/invitations'
export * from './sessions/landing'
export * from './sessions/planner'
export * from './sessions/preview'
