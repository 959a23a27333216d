import { z } from 'zod'
import { INSTRUMENTS, PLAYER_LEVELS } from '../../constants'
import { visibleText } from '../visibleText'

// What the findings page and its exports accept: exclusions, the subgroup filter and the
// table names.

export const EXCLUSION_REASON = { min: 3, max: 500 } as const

const reason = visibleText(
  z
    .string('A reason is required')
    .trim()
    .min(EXCLUSION_REASON.min, `Say why in at least ${EXCLUSION_REASON.min} characters`)
    .max(EXCLUSION_REASON.max, `At most ${EXCLUSION_REASON.max} characters`),
)

/** POST /api/findings/:id/exclusions */
export const excludePlayerBody = z.strictObject({
  playerCode: z.string().trim().min(1, 'Choose a player').max(16),
  reason,
})
export type ExcludePlayerBody = z.infer<typeof excludePlayerBody>

/** DELETE /api/findings/:id/exclusions/:playerCode: taking a player back needs a reason too. */
export const includePlayerBody = z.strictObject({ reason })
export type IncludePlayerBody = z.infer<typeof includePlayerBody>

export const playerCodeParam = z.object({
  id: z.coerce.number().int().positive(),
  playerCode: z.string().trim().min(1).max(16),
})

// An empty value from a cleared filter box means "everyone", not an error.
const blankAsAll = (v: unknown) => (v === '' || v === 'all' ? undefined : v)

/** Subgroup filter of GET /api/findings/:id and the table exports. */
export const findingsQuery = z.strictObject({
  instrument: z.preprocess(blankAsAll, z.enum(INSTRUMENTS, 'Unknown instrument').optional()),
  level: z.preprocess(blankAsAll, z.enum(PLAYER_LEVELS, 'Unknown level').optional()),
})
export type FindingsQuery = z.infer<typeof findingsQuery>

export const FINDINGS_TABLES = [
  'means',
  'pairs',
  'omnibus',
  'preferences',
  'scale',
  'triangle',
  'reliability',
  'objective',
  'aging',
  'interim',
  'mixed',
  'contrasts',
] as const
export type FindingsTable = (typeof FINDINGS_TABLES)[number]

export const exportTableParam = z.object({
  id: z.coerce.number().int().positive(),
  table: z.enum(FINDINGS_TABLES, 'Unknown table'),
})
