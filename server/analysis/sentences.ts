import { formatInterval, formatNumber, formatP } from './format.ts'
import type { FriedmanResult } from './friedman.ts'
import type { PairedTResult } from './paired.ts'

export interface PairWording {
  first: string
  second: string
  attribute: string
  /** Comparative for a higher rating, e.g. "brighter"; falls back to "higher on <attribute>". */
  higher?: string
}

/**
 * The plain sentence for one pair. `t` holds second − first. The higher-rated recipe leads so
 * the number is always positive; a difference that does not survive the adjustment (Holm or
 * BH, named by `label`) is said to be unclear
 * before any number is given, so a skimming reader is not misled.
 */
export function pairSentence(
  words: PairWording,
  t: PairedTResult,
  adjustedP: number | null,
  alpha = 0.05,
  label = 'Holm',
): string {
  const { first, second, attribute } = words
  const d = t.meanDifference
  if (t.reason === 'no variance' && d !== null) {
    if (d === 0) return `${first} and ${second} are rated the same on ${attribute} by every player.`
    return (
      `Every player rated ${d > 0 ? second : first} ${formatNumber(Math.abs(d))} points ` +
      `${comparative(words)} than ${d > 0 ? first : second}; with no spread there is no test.`
    )
  }
  if (t.reason === 'no player rated both') {
    return `No player has rated both ${first} and ${second} on ${attribute} yet.`
  }
  if (d === null || t.ci === null || adjustedP === null) {
    return `No comparison of ${first} and ${second} on ${attribute} yet: ${t.n} ${players(t.n)} rated both, and a test needs two.`
  }
  const secondHigher = d >= 0
  const high = secondHigher ? second : first
  const low = secondHigher ? first : second
  const ci = secondHigher ? t.ci : { lower: -t.ci.upper, upper: -t.ci.lower }
  const detail = `by ${formatNumber(Math.abs(d))} points (95% CI ${formatInterval(ci)}), ${label} p ${formatP(adjustedP)}`
  if (adjustedP < alpha) return `${high} is rated ${comparative(words)} than ${low} ${detail}.`
  return `No clear difference between ${first} and ${second} on ${attribute}: ${high} is rated ${comparative(words)} ${detail}.`
}

function comparative(words: PairWording): string {
  return words.higher ?? `higher on ${words.attribute}`
}

function players(n: number): string {
  return n === 1 ? 'player' : 'players'
}

export function omnibusSentence(
  attribute: string,
  f: FriedmanResult,
  dropped: number,
  ratedRecipes = f.k,
): string {
  const tail = dropped > 0 ? `; ${dropped} ${players(dropped)} without every recipe left out` : ''
  if (f.reason === 'fewer than three recipes') {
    return `With fewer than three recipes the pair comparison is the whole test for ${attribute}.`
  }
  if (f.reason === 'nobody rated this attribute') {
    return `Nobody has rated ${attribute} yet: there is nothing to test.`
  }
  if (f.reason === 'fewer than three recipes rated') {
    const rated = ratedRecipes === 1 ? 'only one recipe has' : `only ${ratedRecipes} recipes have`
    return `No overall test on ${attribute}: ${rated} been rated on it so far.`
  }
  if (f.reason === 'no variance') {
    return `Every player gave all recipes the same ${attribute} rating: nothing to rank${tail}.`
  }
  if (f.chiSquare === null || f.p === null || f.kendallW === null) {
    return `No overall test on ${attribute}: it needs two players who rated every recipe, and ${f.n} did${tail}.`
  }
  return (
    `Friedman test on ${attribute}: χ²(${f.df}) = ${formatNumber(f.chiSquare, 2)}, p ${formatP(f.p)}, ` +
    `Kendall's W = ${formatNumber(f.kendallW, 2)}, ${f.n} ${players(f.n)}${tail}.`
  )
}
