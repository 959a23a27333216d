// Limits and vocabularies shared by the client forms and the server's validation, so both
// sides refuse the same input with the same words.

export const ROLES = ['admin', 'developer', 'analyst', 'player'] as const
export type Role = (typeof ROLES)[number]

/** Roles that sign in with e-mail and password; players only ever use invitation links. */
export const STAFF_ROLES = ['admin', 'developer', 'analyst'] as const
export type StaffRole = (typeof STAFF_ROLES)[number]

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
  passwordMax: 200,
  searchMax: 100,
  csvMaxBytes: 1_000_000,
  csvMaxRows: 5000,
} as const

export const MAIL_STATUSES = ['pending', 'sent', 'failed'] as const
export type MailStatus = (typeof MAIL_STATUSES)[number]
