import type { TrialAnswer } from '@shared/schemas/rating'

/** Colours the waveform draws with, from the palette of the theme in use. */
export interface WaveColours {
  wave: string
  progress: string
  cursor: string
  region: string
}

/** A screen hands each answer up with how long to wait before sending (sliders debounce). */
export type AnswerHandler = (trialIndex: number, answer: TrialAnswer, delayMs?: number) => void

/** Slider drags settle before they are sent; a tap or choice goes at once. */
export const SLIDER_DEBOUNCE_MS = 400
