import { z } from 'zod'
import type { AttributeSpec, PlayerLanding, SessionFormat } from './sessions'

// What the player's browser exchanges with the server. Everything here carries blind codes and
// opaque references only: never a recipe, a clip id or a file name.

export const playerToken = z.string().trim().min(1, 'The link has no token').max(4000)

/** A line-scale value: 0–100, as the slider reports it. */
const scaleValue = z.number().min(0, 'Below the scale').max(100, 'Above the scale')

export const ratingAnswer = z.strictObject({
  kind: z.literal('rating'),
  /** attribute key → value; only the sliders the player moved. */
  values: z.record(z.string().max(40), scaleValue),
})
export const pairAnswer = z.strictObject({
  kind: z.literal('pair'),
  /** Blind code of the preferred clip, or null for "no preference" where the session allows it. */
  preferred: z.number().int().nullable(),
  /** attribute key → blind code of the clip with more of it. */
  more: z.record(z.string().max(40), z.number().int()),
})
export const triangleAnswer = z.strictObject({
  kind: z.literal('triangle'),
  /** Blind code of the clip the player hears as the odd one (forced choice). */
  odd: z.number().int(),
})
export const playtestAnswer = z.strictObject({
  kind: z.literal('playtest'),
  values: z.record(z.string().max(40), scaleValue),
  comment: z.string().trim().max(2000).default(''),
})
export const trialAnswer = z.discriminatedUnion('kind', [
  ratingAnswer,
  pairAnswer,
  triangleAnswer,
  playtestAnswer,
])
export type TrialAnswer = z.input<typeof trialAnswer>

/** PUT /api/player/answers/:trialIndex — idempotent: the same trial saved twice counts once. */
export const saveAnswerBody = z.strictObject({
  token: playerToken,
  answer: trialAnswer,
})

export const headphoneCheckBody = z.strictObject({
  token: playerToken,
  /** Correct answers out of `trials` in the three-tone antiphase check. */
  correct: z.number().int().min(0).max(20),
  trials: z.number().int().min(1).max(20),
})

export const tokenBody = z.strictObject({ token: playerToken })

export interface PlayerClipView {
  code: number
  /** Opaque address of the level-matched rendition; says nothing about the recipe. */
  audioUrl: string
  duration: number
  peaks: { min: number[]; max: number[] }
}

export interface PlayerTrialView {
  index: number
  kind: SessionFormat
  /** Trials with the same screen number are answered on one screen (the clips of a matched set). */
  screen: number
  clips: PlayerClipView[]
  setCode: number | null
}

export interface PlayerPlanView {
  sessionName: string
  format: SessionFormat
  instructions: string
  deadline: string
  cautions: string[]
  attributes: AttributeSpec[]
  allowNoPreference: boolean
  trials: PlayerTrialView[]
}

export interface PlayerState {
  landing: PlayerLanding
  consentAt: string | null
  /** The latest headphone check; `attempts` counts every check sent, failed ones included. */
  headphone: { correct: number; trials: number; passed: boolean; attempts: number } | null
  levelSetAt: string | null
  /** Answers already stored, so a reopened link resumes where the player left. */
  answers: { trialIndex: number; answer: TrialAnswer }[]
  /** False once the session is closed, the deadline has passed or the link was revoked. */
  canAnswer: boolean
}

export interface SaveAnswerResult {
  saved: true
  /** The same answer had already been stored: nothing was counted twice. */
  duplicate: boolean
  answered: number
  trialCount: number
  done: boolean
}

/** The headphone check's pass mark: 5 of 6 (Woods et al. 2017). */
export const HEADPHONE_PASS = { correct: 5, trials: 6 } as const
