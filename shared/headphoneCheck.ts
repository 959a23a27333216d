// The headphone check's rules, shared by the server (which deals and scores each attempt) and
// the player's page (which plays the tones). No validation library here: the player's page
// imports this module, and it must stay small.
import { seededRandom } from './seededRandom'

export { seededRandom }

/** The pass mark, 5 of 6 (Woods et al. 2017). */
export const HEADPHONE_PASS = { correct: 5, trials: 6 } as const

/**
 * A failed check may be taken once more, after a pause long enough to put headphones on
 * properly; after that the player goes on and the invitation is flagged.
 */
export const HEADPHONE_RETRY = { attempts: 2, pauseSeconds: 30 } as const

export type ToneKind = 'reference' | 'antiphase' | 'quiet'

export interface HeadphoneTrial {
  tones: [ToneKind, ToneKind, ToneKind]
  /** Index (0–2) of the quieter in-phase tone: the right answer. */
  answer: number
}

/**
 * Where an invitation's check stands: passed at some attempt; failed with another attempt
 * still open; or failed at every attempt allowed, so the player went on flagged.
 */
export type HeadphoneStatus = 'passed' | 'retry' | 'failed'

/** One attempt as the server deals it: the order of the three tones of each trial. */
export interface HeadphoneDeal {
  attempt: number
  trials: { tones: [ToneKind, ToneKind, ToneKind] }[]
}

const ORDERS: [ToneKind, ToneKind, ToneKind][] = [
  ['reference', 'antiphase', 'quiet'],
  ['reference', 'quiet', 'antiphase'],
  ['antiphase', 'reference', 'quiet'],
  ['antiphase', 'quiet', 'reference'],
  ['quiet', 'reference', 'antiphase'],
  ['quiet', 'antiphase', 'reference'],
]

/**
 * Six trials that use every order of the three tones once, shuffled: the quiet tone is in each
 * position equally often, so a listener with a habit ("always the last") gains nothing.
 */
export function headphoneTrials(
  random: () => number = Math.random,
  count: number = HEADPHONE_PASS.trials,
): HeadphoneTrial[] {
  const trials: HeadphoneTrial[] = []
  while (trials.length < count) {
    const block = ORDERS.slice()
    for (let i = block.length - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1))
      ;[block[i], block[j]] = [block[j], block[i]]
    }
    for (const tones of block) {
      if (trials.length < count) trials.push({ tones, answer: tones.indexOf('quiet') })
    }
  }
  return trials
}

/** Passing needs the full check and at least the pass mark's share of it right. */
export function headphonePassed(correct: number, trials: number): boolean {
  return (
    trials >= HEADPHONE_PASS.trials &&
    correct * HEADPHONE_PASS.trials >= HEADPHONE_PASS.correct * trials
  )
}
