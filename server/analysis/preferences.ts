import { signTest, type SignTestResult } from './binomial.ts'
import { bradleyTerry, type BradleyTerryResult } from './bradleyTerry.ts'
import { ADJUSTMENT_LABEL, adjustP, type Adjustment } from './adjust.ts'
import { formatP } from './format.ts'
import type { Id } from './types.ts'

/** One pair-preference answer; `preferred` is null for "no preference". */
export interface PreferenceAnswer {
  player: Id
  first: Id
  second: Id
  preferred: Id | null
}

export interface PreferencePair {
  first: Id
  second: Id
  firstPreferred: number
  secondPreferred: number
  noPreference: number
  /** Exact two-sided sign test of firstPreferred against an even split, no-preference set aside. */
  test: SignTestResult
  /** Adjusted (Holm or BH, as the session chose) across all pairs of this session. */
  adjustedP: number | null
  sentence: string
}

export interface PreferenceFindings {
  pairs: PreferencePair[]
  /** Overall preference scale from every answer that chose a side. */
  scale: BradleyTerryResult
}

const percent = (x: number) => `${Math.round(x * 100)}%`

/**
 * Counts, sign tests and the Bradley–Terry scale for pair preferences. Recipe order in `recipes`
 * fixes the pair order and the reference (the first recipe) of the scale.
 */
export function preferenceFindings(
  answers: readonly PreferenceAnswer[],
  recipes: readonly Id[],
  names: (id: Id) => string = String,
  adjustment: Adjustment = 'holm',
): PreferenceFindings {
  const index = new Map(recipes.map((id, i) => [id, i]))
  const k = recipes.length
  const wins = recipes.map(() => new Array<number>(k).fill(0))
  const ties = recipes.map(() => new Array<number>(k).fill(0))
  for (const a of answers) {
    const i = index.get(a.first)
    const j = index.get(a.second)
    if (i === undefined || j === undefined || i === j) continue
    if (a.preferred === null) {
      ties[Math.min(i, j)][Math.max(i, j)]++
      continue
    }
    const winner = index.get(a.preferred)
    // An answer naming a recipe outside its own pair is malformed; it is not counted.
    if (winner === i) wins[i][j]++
    else if (winner === j) wins[j][i]++
  }

  const raw: Omit<PreferencePair, 'adjustedP' | 'sentence'>[] = []
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const asked = wins[i][j] + wins[j][i] + ties[i][j]
      if (asked === 0) continue
      raw.push({
        first: recipes[i],
        second: recipes[j],
        firstPreferred: wins[i][j],
        secondPreferred: wins[j][i],
        noPreference: ties[i][j],
        test: signTest(wins[i][j], wins[j][i], ties[i][j]),
      })
    }
  }
  const adjusted = adjustP(
    raw.map((p) => p.test.p),
    adjustment,
  )
  const pairs = raw.map((p, n) => ({
    ...p,
    adjustedP: adjusted[n],
    sentence: preferenceSentence(p, adjusted[n], names, ADJUSTMENT_LABEL[adjustment]),
  }))
  return { pairs, scale: bradleyTerry(recipes, wins) }
}

function preferenceSentence(
  p: Omit<PreferencePair, 'adjustedP' | 'sentence'>,
  adjustedP: number | null,
  names: (id: Id) => string,
  label: string,
): string {
  const chose = p.firstPreferred + p.secondPreferred
  const aside = p.noPreference > 0 ? `; ${p.noPreference} had no preference` : ''
  if (chose === 0 || adjustedP === null || p.test.ci === null) {
    return `No player chose between ${names(p.first)} and ${names(p.second)}${aside}.`
  }
  const firstLeads = p.firstPreferred >= p.secondPreferred
  const leader = firstLeads ? p.first : p.second
  const count = firstLeads ? p.firstPreferred : p.secondPreferred
  const ci = firstLeads ? p.test.ci : { lower: 1 - p.test.ci.upper, upper: 1 - p.test.ci.lower }
  return (
    `${names(leader)} was preferred in ${count} of ${chose} choices (${percent(count / chose)}, ` +
    `95% CI ${percent(ci.lower)} to ${percent(ci.upper)}), ${label} p ${formatP(adjustedP)}${aside}.`
  )
}
