import type { FindingsProvenance } from '@shared/schemas/findings'
import { reportTime } from './format'

/** The audited changes that can alter findings, in the words a reader of the report uses. */
const CHANGE_WORDS: Record<string, string> = {
  'findings.player_excluded': 'player excluded',
  'findings.player_included': 'player included again',
  'session.updated': 'session edited',
  'session.opened': 'session opened',
  'session.closed': 'session closed',
}

/** An action the list above does not know yet still reads as words, not as a code. */
export const changeWords = (action: string) =>
  CHANGE_WORDS[action] ?? action.replace(/^[^.]*\./, '').replace(/_/g, ' ')

const count = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`

/** How many of the excluded were left out by default for a failed headphone check. */
const headphoneNote = (p: FindingsProvenance) =>
  p.headphoneExcluded > 0 ? ` (${p.headphoneExcluded} for a failed headphone check)` : ''

/**
 * One line saying what the findings were computed from, so that two printouts of the same
 * session can be told apart: "Computed from 312 answers of 12 players, 3 excluded (2 for a failed
 * headphone check); last answer 2 Dec 2026 14:03; last change: player excluded, 2 Dec 2026 14:10".
 */
export function provenanceLine(p: FindingsProvenance): string {
  const parts = [
    p.answers === 0
      ? 'No answers yet'
      : `Computed from ${count(p.answers, 'answer', 'answers')} of ${count(p.players, 'player', 'players')}, ${
          p.excluded === 0 ? 'none' : p.excluded
        } excluded${headphoneNote(p)}`,
  ]
  if (p.lastAnswerAt) parts.push(`last answer ${reportTime(p.lastAnswerAt)}`)
  if (p.lastChange)
    parts.push(`last change: ${changeWords(p.lastChange.action)}, ${reportTime(p.lastChange.at)}`)
  return parts.join('; ')
}
