import type { CorrelatedMeasureName } from '../measures'
import { z } from 'zod'
import { INSTRUMENTS, PLAYER_LEVELS, type Instrument, type PlayerLevel } from '../constants'
import type { SessionFormat, SessionStatus } from './sessions'

// The findings page and its exports: staff only. Recipes appear by id and name here, which is
// why nothing in this file may ever reach a player's screen.

export const EXCLUSION_REASON = { min: 3, max: 500 } as const

const reason = z
  .string('A reason is required')
  .trim()
  .min(EXCLUSION_REASON.min, `Say why in at least ${EXCLUSION_REASON.min} characters`)
  .max(EXCLUSION_REASON.max, `At most ${EXCLUSION_REASON.max} characters`)

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
] as const
export type FindingsTable = (typeof FINDINGS_TABLES)[number]

export const exportTableParam = z.object({
  id: z.coerce.number().int().positive(),
  table: z.enum(FINDINGS_TABLES, 'Unknown table'),
})

/** Why a figure is missing: the engine's reasons, shown as they are. */
export type FindingsReason = string | null

export interface Interval {
  lower: number
  upper: number
}

export interface RecipeRef {
  id: number
  name: string
}

export interface RecipeMean {
  recipe: number
  name: string
  n: number
  mean: number | null
  sd: number | null
  ci: Interval | null
  reason: FindingsReason
}

/** One recipe pair on one attribute; `difference` is second − first. */
export interface PairRow {
  first: number
  second: number
  n: number
  dropped: number
  difference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  holmP: number | null
  wilcoxonV: number | null
  wilcoxonP: number | null
  wilcoxonMethod: 'exact' | 'normal' | null
  wilcoxonHolmP: number | null
  dz: number | null
  rankBiserial: number | null
  sentence: string
  reason: FindingsReason
}

export interface OmnibusLine {
  test: 'friedman'
  n: number
  dropped: number
  recipes: number[]
  chiSquare: number | null
  df: number | null
  p: number | null
  kendallW: number | null
  rankSums: number[]
  sentence: string
  reason: FindingsReason
}

export interface AttributeFindings {
  /** The attribute's key in the session. */
  attribute: string
  name: string
  /** End labels of the line scale, for axis captions. */
  low: string
  high: string
  players: number
  recipes: RecipeMean[]
  pairs: PairRow[]
  omnibus: OmnibusLine
}

export interface SignTest {
  successes: number
  n: number
  estimate: number | null
  p: number | null
  ci: Interval | null
  ties: number
  reason: FindingsReason
}

export interface PreferencePair {
  first: number
  second: number
  firstPreferred: number
  secondPreferred: number
  noPreference: number
  test: SignTest
  holmP: number | null
  sentence: string
}

export interface ScaleAbility {
  item: number
  name: string
  logAbility: number
  se: number
  wins: number
  comparisons: number
}

/** Bradley–Terry: log abilities against the first recipe, and modelled win chances. */
export interface PreferenceScale {
  items: number[]
  reference: number | null
  abilities: ScaleAbility[]
  winProbability: number[][]
  converged: boolean
  reason: FindingsReason
}

/** "Which has more <attribute>?" for one pair: counts and a sign test. */
export interface MorePair {
  first: number
  second: number
  firstMore: number
  secondMore: number
  test: SignTest
  holmP: number | null
  sentence: string
}

export interface PreferenceFindings {
  /** Choices that named a side or "no preference". */
  answers: number
  pairs: PreferencePair[]
  scale: PreferenceScale
  attributes: { attribute: string; name: string; pairs: MorePair[] }[]
}

export interface TriangleFindings {
  correct: number
  n: number
  p: number | null
  minimumCorrect05: number | null
  minimumCorrect01: number | null
  pd: number | null
  pdCi: Interval | null
  /** Answers to hidden repeats, set aside: a repeat is not a new, independent judgement. */
  repeatsSetAside: number
  verdict: string
  reason: FindingsReason
}

export interface PlayerReliabilityRow {
  playerCode: string
  duplicatePairs: number
  misses: number
  missShare: number | null
  /** Spearman rho of the player's recipe means against the rest of the panel's. */
  looSpearman: number | null
  flagged: boolean
  excluded: boolean
  exclusionReason: string | null
  reason: FindingsReason
}

export interface ReliabilityFindings {
  rule: string
  players: PlayerReliabilityRow[]
}

/** A measure findings correlate with perception: see shared/measures.ts. */
export type ClipMeasureName = CorrelatedMeasureName

export interface ObjectiveRow {
  measure: ClipMeasureName
  unit: string
  attribute: string
  name: string
  rho: number | null
  p: number | null
  n: number
  reason: FindingsReason
  /** One point per clip: the measure against the panel's mean rating of that clip. */
  points: { x: number; y: number; clipId: number; recipeId: number }[]
}

export interface AgingPoint {
  sessionId: number
  label: string
  n: number
  mean: number | null
  ci: Interval | null
  reason: FindingsReason
}

/** One recipe's change from the first time point to a later one; `difference` is later − first. */
export interface AgingChange {
  recipeId: number
  name: string
  from: string
  to: string
  n: number
  difference: number | null
  ci: Interval | null
  t: number | null
  df: number | null
  p: number | null
  holmP: number | null
  wilcoxonP: number | null
  dz: number | null
  sentence: string
  reason: FindingsReason
}

export interface AgingFindings {
  timePoints: { sessionId: number; label: string; status: SessionStatus }[]
  attributes: {
    attribute: string
    name: string
    series: { recipeId: number; name: string; points: AgingPoint[] }[]
    changes: AgingChange[]
  }[]
}

export interface FindingsSummary {
  invited: number
  done: number
  inProgress: number
  excluded: number
  answers: number
  /** Stored answers that do not fit the session's plan or the answer format; left out. */
  unreadable: number
  /** done / invited, 0 when nobody is invited. */
  completion: number
}

export interface SessionFindings {
  session: {
    id: number
    name: string
    format: SessionFormat
    status: SessionStatus
    timePointLabel: string | null
  }
  summary: FindingsSummary
  filters: {
    instrument: Instrument | null
    level: PlayerLevel | null
    available: { instruments: Instrument[]; levels: PlayerLevel[] }
  }
  /** Why the page has nothing to show (e.g. "not enough data: no answers yet"); null otherwise. */
  reason: FindingsReason
  recipes: RecipeRef[]
  /** Line-scale findings (attribute rating and play-test); empty for other formats. */
  attributes: AttributeFindings[]
  preferences: PreferenceFindings | null
  triangle: TriangleFindings | null
  reliability: ReliabilityFindings
  objective: ObjectiveRow[]
  aging: AgingFindings | null
}
