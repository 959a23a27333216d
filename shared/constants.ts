// Limits and vocabularies shared by the client forms and the server's validation, so both
// sides refuse the same input with the same words.

export const ROLES = ['admin', 'developer', 'analyst', 'player'] as const
export type Role = (typeof ROLES)[number]

/** Roles that sign in with e-mail and password; players only ever use invitation links. */
export const STAFF_ROLES = ['admin', 'developer', 'analyst'] as const
export type StaffRole = (typeof STAFF_ROLES)[number]

// Who may do what, written once: route tables, the client's route guards and views use these.
/** Every staff role. */
export const STAFF: readonly Role[] = STAFF_ROLES
/** Those who make things: recipes, clips, sessions, invitations. */
export const EDITORS: readonly Role[] = ['admin', 'developer']
/** Those who may exclude panelists from findings. */
export const EXCLUDERS: readonly Role[] = ['admin', 'analyst']
export const ADMIN: readonly Role[] = ['admin']

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Admin',
  developer: 'Product developer',
  analyst: 'Analyst',
  player: 'Player',
}

export const USER_STATUSES = ['invited', 'active', 'deactivated'] as const
export type UserStatus = (typeof USER_STATUSES)[number]

export const INSTRUMENTS = ['violin', 'viola', 'cello', 'double bass'] as const
export type Instrument = (typeof INSTRUMENTS)[number]

export const PLAYER_LEVELS = ['professional', 'teacher', 'student', 'amateur'] as const
export type PlayerLevel = (typeof PLAYER_LEVELS)[number]

export const PLAYER_STATUSES = ['active', 'inactive', 'deleted'] as const
export type PlayerStatus = (typeof PLAYER_STATUSES)[number]

export const LIMITS = {
  nameMax: 120,
  emailMax: 254,
  regionMax: 80,
  notesMax: 2000,
  passwordMin: 10,
  searchMax: 100,
  csvMaxBytes: 1_000_000,
  csvMaxRows: 5000,
} as const

export const MAIL_STATUSES = ['pending', 'sent', 'failed'] as const
export type MailStatus = (typeof MAIL_STATUSES)[number]

/** Open strings in standard tuning, low to high, with their pitch in Hz at A4 = 440 Hz (ISO 16). */
export const TUNINGS: Record<Instrument, { name: string; hz: number }[]> = {
  violin: [
    { name: 'G', hz: 196.0 },
    { name: 'D', hz: 293.66 },
    { name: 'A', hz: 440.0 },
    { name: 'E', hz: 659.26 },
  ],
  viola: [
    { name: 'C', hz: 130.81 },
    { name: 'G', hz: 196.0 },
    { name: 'D', hz: 293.66 },
    { name: 'A', hz: 440.0 },
  ],
  cello: [
    { name: 'C', hz: 65.41 },
    { name: 'G', hz: 98.0 },
    { name: 'D', hz: 146.83 },
    { name: 'A', hz: 220.0 },
  ],
  // Orchestral tuning.
  'double bass': [
    { name: 'E', hz: 41.2 },
    { name: 'A', hz: 55.0 },
    { name: 'D', hz: 73.42 },
    { name: 'G', hz: 98.0 },
  ],
}

/** Typical vibrating lengths in mm (common practice; a 3/4 double bass). */
export const DEFAULT_VIBRATING_LENGTH_MM: Record<Instrument, number> = {
  violin: 328,
  viola: 375,
  cello: 695,
  'double bass': 1045,
}

export const CORES = [
  'solid steel',
  'stranded steel',
  'synthetic multifilament',
  'gut',
  'other',
] as const
export type Core = (typeof CORES)[number]

export const WINDING_MATERIALS = [
  'silver',
  'aluminium',
  'tungsten',
  'chrome steel',
  'titanium',
  'copper',
  'synthetic fibre',
  'other',
] as const
export const WINDING_PROFILES = ['round', 'flat'] as const

export const DAMPING_KINDS = ['none', 'compound', 'fibre layer', 'other'] as const
export type DampingKind = (typeof DAMPING_KINDS)[number]

/** Lists hide archived recipes and clips by default; they can be shown beside or alone. */
export const ARCHIVED_FILTERS = ['hide', 'include', 'only'] as const
export type ArchivedFilter = (typeof ARCHIVED_FILTERS)[number]

export const RECIPE_STATUSES = ['draft', 'prototype', 'retired'] as const
export type RecipeStatus = (typeof RECIPE_STATUSES)[number]

/**
 * The header a player's page sends its invitation token in. A token in a URL's query would
 * reach request logs, proxies and browser history; a header reaches none of them.
 */
export const INVITATION_HEADER = 'X-Invitation-Token'
