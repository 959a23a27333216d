// Recordings of recipes: their vocabulary, what the clip pages send, excerpts and the clip
// views. Split by topic under clips/; this file keeps every import of shared/schemas/clips
// working.

export * from './clips/vocabulary'
export * from './clips/requests'
export * from './clips/excerpts'
export * from './clips/responses'
