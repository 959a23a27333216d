import { z } from 'zod'
import type { AttributeSpec, PlayerLanding, SessionFormat } from './sessions'
import type { HeadphoneStatus } from '../headphoneCheck'

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

/**
 * POST /api/player/headphone — the player's pick (0–2: which tone was quietest) for each trial of
 * the attempt the server dealt; the server scores it.
 */
export const headphoneCheckBody = z.strictObject({
  token: playerToken,
  attempt: z.number().int().min(1).max(20),
  responses: z
    .array(z.number().int().min(0, 'Tone 1, 2 or 3').max(2, 'Tone 1, 2 or 3'))
    .min(1, 'Answer every set of tones')
    .max(20),
})

export const tokenBody = z.strictObject({ token: playerToken })

/** A clip as a player meets it: its code and an address; no length, level or picture. */
export interface PlayerClipView {
  code: number
  /** Opaque address of the level-matched rendition; says nothing about the recipe. */
  audioUrl: string
}

/**
 * The one waveform of a screen: the envelope of its matched set's clips together, the same
 * whichever code is selected and on every screen of the set.
 */
export interface PlayerPicture {
  duration: number
  min: number[]
  max: number[]
}

export interface PlayerTrialView {
  index: number
  kind: SessionFormat
  /** Trials with the same screen number are answered on one screen (the clips of a matched set). */
  screen: number
  clips: PlayerClipView[]
  /** Null for play-tests, which play nothing. */
  picture: PlayerPicture | null
  setCode: number | null
}

export interface PlayerPlanView {
  playerTitle: string
  format: SessionFormat
  playerMessage: string
  deadline: string
  cautions: string[]
  attributes: AttributeSpec[]
  allowNoPreference: boolean
  trials: PlayerTrialView[]
}

export interface PlayerState {
  landing: PlayerLanding
  consentAt: string | null
  /** Where the headphone check stands; null before the first attempt is scored. */
  headphone: PlayerHeadphone | null
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
export { HEADPHONE_PASS } from '../headphoneCheck'

/** The player's own headphone check: the latest scored attempt and what may come next. */
export interface PlayerHeadphone {
  status: HeadphoneStatus
  /** Right answers and trials of the latest scored attempt. */
  correct: number
  trials: number
  passed: boolean
  /** Attempts scored so far, failed ones included. */
  attempts: number
  /** Seconds until another attempt may start (0: now); null when no attempt is left or needed. */
  retryInSeconds: number | null
}
