// The findings page and its exports: staff only. Recipes appear by id and name here, which is
// why nothing in this file may ever reach a player's screen. Split by topic under findings/;
// this file keeps every import of shared/schemas/findings working.

export * from './findings/requests'
export * from './findings/common'
export * from './findings/attributes'
export * from './findings/preferences'
export * from './findings/panel'
export * from './findings/objective'
export * from './findings/aging'
export * from './findings/session'
