import { z } from 'zod'
import { LIMITS } from '../../constants'
import { isoDate } from '../common'
import { visibleText } from '../visibleText'
import { namesAChange, revision } from '../revision'
import { attributeSpec, DEFAULT_ATTRIBUTES } from './attributes'

/**
 * How each family of pairs is adjusted for being many: Holm holds the chance of any false
 * "clear difference" at α; Benjamini–Hochberg (BH) holds the expected share of false ones among
 * those called clear at α, and loses less power when many recipes are compared.
 */
export const P_ADJUSTMENTS = ['holm', 'bh'] as const
export type PAdjustment = (typeof P_ADJUSTMENTS)[number]

// What a session is: its format and status, and the design a developer sends to make or
// change one.

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

/** One matched set: clips of the same excerpt, performer and instrument; only the string differs. */
export const clipSetSpec = z.strictObject({
  key: z.string().min(1).max(200),
  clipIds: z.array(z.number().int().positive()).min(1).max(20),
  /**
   * Second takes of recipes the set plays: served where a trial holds a recipe twice (a
   * triangle's twin, a hidden repeat), so the two servings are different recordings.
   */
  twinClipIds: z.array(z.number().int().positive()).max(20).optional(),
})
export type ClipSetSpec = z.infer<typeof clipSetSpec>

/** A player title fits a mail subject and the bar over the player's pages. */
export const PLAYER_TITLE_MAX = 80

export const sessionDesignFields = {
  /** Staff only: players see the player title and message instead. */
  name: visibleText(z.string().trim().min(1, 'Required').max(LIMITS.nameMax)),
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
  adjustment: z.enum(P_ADJUSTMENTS, 'Choose Holm or Benjamini–Hochberg'),
  /** Smallest difference worth finding, in rating points: what the interim look plans for. */
  targetDifference: z
    .number('A number of rating points')
    .gt(0, 'Above 0')
    .max(100, 'At most 100 points')
    .nullable(),
  playerTitle: visibleText(
    z
      .string()
      .trim()
      .min(1, 'Required: the title players see')
      .max(PLAYER_TITLE_MAX, `At most ${PLAYER_TITLE_MAX} characters`),
  ),
  playerMessage: z.string().trim().max(LIMITS.notesMax),
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

const timePointLabel = visibleText(
  z
    .string()
    .trim()
    .min(1, 'Required')
    .max(
      SESSION_LIMITS.timePointLabelMax,
      `At most ${SESSION_LIMITS.timePointLabelMax} characters`,
    ),
)

/** A new session: only what cannot be guessed is required. */
export const sessionDesignBody = z
  .strictObject({
    ...sessionDesignFields,
    purpose: sessionDesignFields.purpose.default(''),
    clipSets: sessionDesignFields.clipSets.default([]),
    attributes: sessionDesignFields.attributes.default(DEFAULT_ATTRIBUTES),
    duplicates: sessionDesignFields.duplicates.default(0),
    allowNoPreference: sessionDesignFields.allowNoPreference.default(false),
    adjustment: sessionDesignFields.adjustment.default('holm'),
    targetDifference: sessionDesignFields.targetDifference.default(null),
    playerMessage: sessionDesignFields.playerMessage.default(''),
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
    adjustment: sessionDesignFields.adjustment.optional(),
    targetDifference: sessionDesignFields.targetDifference.optional(),
    playerTitle: sessionDesignFields.playerTitle.optional(),
    playerMessage: sessionDesignFields.playerMessage.optional(),
    deadline: sessionDesignFields.deadline.optional(),
    reminderDaysBefore: sessionDesignFields.reminderDaysBefore.optional(),
    timePointLabel: timePointLabel.nullable().optional(),
    revision,
  })
  .refine(namesAChange, 'Nothing to change')
export type UpdateSessionBody = z.infer<typeof updateSessionBody>

/** Fields that shape the players' plans: frozen once anyone has answered. */
export const LOCKED_DESIGN_FIELDS = [
  'format',
  'recipeIds',
  'clipSets',
  'attributes',
  'duplicates',
  'allowNoPreference',
  'adjustment',
  'targetDifference',
] as const

/** Opening a draft: an empty body, or the designer's acceptance of a single-take warning. */
export const openSessionBody = z
  .strictObject({ acceptSameTake: z.boolean('Say whether you accept the warning').optional() })
  .default({})
export type OpenSessionBody = z.input<typeof openSessionBody>

export const timePointBody = z.strictObject({
  label: timePointLabel,
  deadline: isoDate,
  inviteSamePlayers: z.boolean('Say whether to invite the same players').default(false),
})
export type TimePointBody = z.input<typeof timePointBody>
