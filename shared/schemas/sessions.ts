import { z } from 'zod'
import { LIMITS } from '../constants'
import { isoDate } from './common'

export const SESSION_FORMATS = ['pair', 'rating', 'triangle', 'playtest'] as const
export type SessionFormat = (typeof SESSION_FORMATS)[number]

export const SESSION_FORMAT_LABELS: Record<SessionFormat, string> = {
  pair: 'Pair preference (paired comparison, ISO 5495)',
  rating: 'Attribute rating (line scales, ISO 13299)',
  triangle: 'Odd-one-out (triangle test, ISO 4120)',
  playtest: 'Play-test of coded sets',
}

export const SESSION_STATUSES = ['draft', 'open', 'closed'] as const
export type SessionStatus = (typeof SESSION_STATUSES)[number]

export const INVITATION_STATUSES = [
  'invited',
  'opened',
  'in_progress',
  'done',
  'expired',
  'revoked',
] as const
export type InvitationStatus = (typeof INVITATION_STATUSES)[number]

/** An attribute as it is copied into a session: later edits elsewhere cannot change it. */
export const attributeSpec = z.strictObject({
  key: z
    .string()
    .trim()
    .regex(/^[a-z][a-z0-9_]{0,39}$/, 'Lower-case letters, digits and _; starts with a letter'),
  name: z.string().trim().min(1, 'Required').max(60),
  low: z.string().trim().min(1, 'Required').max(40),
  high: z.string().trim().min(1, 'Required').max(40),
})
export type AttributeSpec = z.infer<typeof attributeSpec>

/** The default attributes of a new session (ours, from the brief). */
export const DEFAULT_ATTRIBUTES: AttributeSpec[] = [
  { key: 'brightness', name: 'Brightness', low: 'dark', high: 'bright' },
  { key: 'bow_response', name: 'Bow response', low: 'slow to speak', high: 'immediate' },
  { key: 'warmth', name: 'Warmth', low: 'thin', high: 'warm' },
]

/** One matched set: clips of the same excerpt, performer and instrument; only the string differs. */
export const clipSetSpec = z.strictObject({
  key: z.string().min(1).max(200),
  clipIds: z.array(z.number().int().positive()).min(1).max(20),
})
export type ClipSetSpec = z.infer<typeof clipSetSpec>

export const sessionDesignFields = {
  name: z.string().trim().min(1, 'Required').max(LIMITS.nameMax),
  purpose: z.string().trim().max(LIMITS.notesMax),
  format: z.enum(SESSION_FORMATS, 'Choose a format'),
  recipeIds: z
    .array(z.number().int().positive())
    .min(2, 'Choose at least two recipes: a comparison needs two')
    .max(12, 'At most 12 recipes'),
  clipSets: z.array(clipSetSpec).max(50),
  attributes: z
    .array(attributeSpec)
    .max(12, 'At most 12 attributes')
    .refine((a) => new Set(a.map((x) => x.key)).size === a.length, 'Two attributes share a key'),
  duplicates: z.number().int().min(0, 'Cannot be negative').max(50),
  allowNoPreference: z.boolean(),
  instructions: z.string().trim().max(LIMITS.notesMax),
  deadline: isoDate,
  reminderDaysBefore: z.number().int().min(0).max(30).nullable(),
}

export const SESSION_LIMITS = {
  recipesMax: 12,
  clipSetsMax: 50,
  attributesMax: 12,
  duplicatesMax: 50,
  timePointLabelMax: 40,
  reminderDaysMax: 30,
  invitePlayersMax: 500,
} as const

const timePointLabel = z
  .string()
  .trim()
  .min(1, 'Required')
  .max(SESSION_LIMITS.timePointLabelMax, `At most ${SESSION_LIMITS.timePointLabelMax} characters`)

/** A new session: only what cannot be guessed is required. */
export const sessionDesignBody = z
  .strictObject({
    ...sessionDesignFields,
    purpose: sessionDesignFields.purpose.default(''),
    clipSets: sessionDesignFields.clipSets.default([]),
    attributes: sessionDesignFields.attributes.default(DEFAULT_ATTRIBUTES),
    duplicates: sessionDesignFields.duplicates.default(0),
    allowNoPreference: sessionDesignFields.allowNoPreference.default(false),
    instructions: sessionDesignFields.instructions.default(''),
    reminderDaysBefore: sessionDesignFields.reminderDaysBefore.default(2),
    timePointLabel: timePointLabel.nullable().default(null),
  })
  .refine((b) => new Set(b.clipSets.map((s) => s.key)).size === b.clipSets.length, {
    message: 'Two clip sets share a key',
    path: ['clipSets'],
  })
export type SessionDesign = z.input<typeof sessionDesignBody>
export type SessionDesignParsed = z.output<typeof sessionDesignBody>

/** Any subset of the design; the server checks the merged whole. */
export const updateSessionBody = z
  .strictObject({
    name: sessionDesignFields.name.optional(),
    purpose: sessionDesignFields.purpose.optional(),
    format: sessionDesignFields.format.optional(),
    recipeIds: sessionDesignFields.recipeIds.optional(),
    clipSets: sessionDesignFields.clipSets.optional(),
    attributes: sessionDesignFields.attributes.optional(),
    duplicates: sessionDesignFields.duplicates.optional(),
    allowNoPreference: sessionDesignFields.allowNoPreference.optional(),
    instructions: sessionDesignFields.instructions.optional(),
    deadline: sessionDesignFields.deadline.optional(),
    reminderDaysBefore: sessionDesignFields.reminderDaysBefore.optional(),
    timePointLabel: timePointLabel.nullable().optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change')
export type UpdateSessionBody = z.infer<typeof updateSessionBody>

/** Fields that shape the players' plans: frozen once anyone has answered. */
export const LOCKED_DESIGN_FIELDS = [
  'format',
  'recipeIds',
  'clipSets',
  'attributes',
  'duplicates',
  'allowNoPreference',
] as const

export const timePointBody = z.strictObject({
  label: timePointLabel,
  deadline: isoDate,
  inviteSamePlayers: z.boolean('Say whether to invite the same players').default(false),
})
export type TimePointBody = z.input<typeof timePointBody>

export const inviteBody = z.strictObject({
  playerIds: z
    .array(z.number().int().positive())
    .min(1, 'Choose at least one player')
    .max(SESSION_LIMITS.invitePlayersMax, `At most ${SESSION_LIMITS.invitePlayersMax} at once`),
})
export type InviteBody = z.infer<typeof inviteBody>

export const previewQuery = z.object({
  player: z.coerce.number().int().min(1, 'Players count from 1').max(10_000).default(1),
})

export const playerLinkQuery = z.object({
  token: z.string().trim().min(1, 'The link has no token').max(4000),
})

const level = (fallback: number) => z.coerce.number().gt(0).lt(1).default(fallback)

export const plannerQuery = z.object({
  difference: z.coerce.number().positive('Above 0').max(100).default(10),
  sd: z.coerce.number().positive('Above 0').max(100).default(15),
  alpha: level(0.05),
  power: level(0.8),
  share: z.coerce.number().gt(0.5, 'Above 0.5').lt(1, 'Below 1').default(0.7),
  pd: z.coerce.number().gt(0, 'Above 0').max(1, 'At most 1').default(0.3),
  /** Answers the triangle criterion is shown for; defaults to the panel's size. */
  n: z.coerce.number().int().min(1).max(100_000).optional(),
})
export type PlannerQuery = z.input<typeof plannerQuery>
export type PlannerParams = z.output<typeof plannerQuery>

// ---------------------------------------------------------------- responses

export interface SessionSummary {
  id: number
  name: string
  format: SessionFormat
  status: SessionStatus
  deadline: string
  recipeCount: number
  invitedCount: number
  doneCount: number
  timePointLabel: string | null
  parentSessionId: number | null
  createdBy: string | null
  createdAt: string
}

export interface ResolvedClip {
  id: number
  recipeId: number
  recipeName: string
  originalName: string
}

/** A matched set as the designer shows it: what was recorded, and by whom. */
export interface ResolvedClipSet extends ClipSetSpec {
  excerptName: string
  performerCode: string
  instrumentCode: string
  clips: ResolvedClip[]
}

export interface TimePoint {
  id: number
  label: string | null
  status: SessionStatus
}

export interface SessionDetail extends SessionSummary {
  purpose: string
  recipeIds: number[]
  /** The design's sets (key, clipIds) with what each holds. */
  clipSets: ResolvedClipSet[]
  attributes: AttributeSpec[]
  duplicates: number
  allowNoPreference: boolean
  instructions: string
  reminderDaysBefore: number | null
  seed: string
  /** Somebody has answered: the fields in LOCKED_DESIGN_FIELDS can no longer change. */
  locked: boolean
  answersCount: number
  /** Trials each player gets, hidden duplicates included. */
  trialCount: number
  warnings: string[]
  recipes: { id: number; name: string }[]
  /** The first session and every later time point, in order. */
  timePoints: TimePoint[]
  openedAt: string | null
  closedAt: string | null
}

/** A clip as a player meets it: a code and an address that says nothing about the recipe. */
export interface PreviewClip {
  code: number
  audioUrl: string
}

export interface PreviewTrial {
  index: number
  kind: SessionFormat
  /** Listening formats: one clip (rating), two (pair) or three (triangle), in serving order. */
  clips: PreviewClip[]
  /** Play-tests: the blind code on the set to play. */
  setCode: number | null
}

/** Exactly what one player sees: codes, scales and trials; no recipe, no repeat marks. */
export interface SessionPreview {
  sessionName: string
  format: SessionFormat
  instructions: string
  deadline: string
  cautions: string[]
  attributes: AttributeSpec[]
  allowNoPreference: boolean
  trials: PreviewTrial[]
}

export interface PlannerResult {
  pairedT: { players: number | null; power: number | null }
  signTest: { players: number | null; power: number | null }
  triangle: {
    players: number | null
    power: number | null
    /** Fewest correct answers out of `answers` that show a difference at alpha. */
    minimumCorrect: number | null
    answers: number
  }
  panelSize: number
}

export interface InvitationRow {
  id: number
  sessionId: number
  playerId: number
  playerCode: string
  playerName: string | null
  playerEmail: string | null
  status: InvitationStatus
  invitedAt: string
  openedAt: string | null
  startedAt: string | null
  completedAt: string | null
  revokedAt: string | null
  lastRemindedAt: string | null
  remindersSent: number
  answered: number
  trialCount: number
}

export interface InviteResult {
  created: number
  existing: number
}

export interface LabelSet {
  code: number
  /** Order in which the player fits and plays the sets, from 1. */
  position: number
  qrSvg: string
  url: string
}

/** Staff only: which recipe goes into which coded envelope. */
export interface PackingLine {
  code: number
  position: number
  recipeName: string
}

export interface LabelSheet {
  players: {
    playerCode: string
    playerName: string | null
    sets: LabelSet[]
    packing: PackingLine[]
  }[]
  caution: string
}

/** What an invitation link opens, before the first trial. */
export interface PlayerLanding {
  sessionName: string
  format: SessionFormat
  instructions: string
  deadline: string
  status: InvitationStatus
  cautions: string[]
  trialCount: number
  answered: number
  firstName: string | null
}
