import { formatNumber } from './format.ts'
import { pairedTPower, pairedTSampleSize } from './planning.ts'
import type { PairRow } from './recipePairs.ts'
import type { Reason } from './types.ts'

// The interim look of a running session: how many more complete players would find the
// difference worth finding with the target power, from the spread seen so far. It plans; it
// never advises stopping, because stopping when a result looks good inflates false findings.

export interface InterimOptions {
  /** The design's smallest difference worth finding (rating points); null: the largest seen. */
  targetDifference: number | null
  /** The session's level before adjustment (default 0.05). */
  alpha?: number
  /** Power to plan for (default 0.8). */
  power?: number
}

export interface InterimLook {
  /** Players who rated every recipe so far. */
  complete: number
  difference: number | null
  /** Where the difference came from: the design, or the largest pair difference so far. */
  differenceSource: 'design' | 'observed' | null
  /** Pooled SD of the players' differences over every recipe pair. */
  sd: number | null
  /** Level each pair is planned at: α over the number of pairs, the strictest step of Holm and BH. */
  alphaPerPair: number | null
  pairs: number
  targetPower: number
  /** Power the complete players have now, for that difference. */
  powerNow: number | null
  /** Complete players needed in all, and how many more that is. */
  needed: number | null
  more: number | null
  sentence: string
  reason: Reason
}

export function interimLook(
  attribute: string,
  pairs: readonly PairRow[],
  complete: number,
  options: InterimOptions,
): InterimLook {
  const { targetDifference, alpha = 0.05, power = 0.8 } = options
  const tested = pairs.filter((p) => p.sdDifference !== null && p.n >= 2)
  const m = pairs.length
  const base = {
    complete,
    difference: null,
    differenceSource: null,
    sd: null,
    alphaPerPair: m > 0 ? alpha / m : null,
    pairs: m,
    targetPower: power,
    powerNow: null,
    needed: null,
    more: null,
  }
  if (tested.length === 0) {
    return {
      ...base,
      sentence: `No plan for ${attribute} yet: it needs two players who rated the same recipes.`,
      reason: 'fewer than two players rated every recipe',
    }
  }
  // Pooled over pairs by their degrees of freedom, as a pooled variance is.
  let ss = 0
  let df = 0
  for (const p of tested) {
    ss += (p.n - 1) * (p.sdDifference as number) ** 2
    df += p.n - 1
  }
  const sd = Math.sqrt(ss / df)
  const observed = Math.max(...tested.map((p) => Math.abs(p.difference ?? 0)))
  const difference = targetDifference ?? observed
  const differenceSource = targetDifference !== null ? 'design' : 'observed'
  const withSpread = { ...base, difference, differenceSource, sd } as const
  if (!(difference > 0)) {
    return {
      ...withSpread,
      sentence: `No plan for ${attribute}: no difference between recipes to plan for yet.`,
      reason: 'no difference to detect',
    }
  }
  if (sd === 0) {
    return {
      ...withSpread,
      sentence: `No plan for ${attribute}: every player's differences are the same so far.`,
      reason: 'no variance',
    }
  }
  const alphaPerPair = alpha / m
  const plan = pairedTSampleSize({ difference, sd, alpha: alphaPerPair, power })
  const powerNow = complete >= 2 ? pairedTPower(complete, difference / sd, alphaPerPair) : null
  const more = plan.n === null ? null : Math.max(0, plan.n - complete)
  const what =
    differenceSource === 'design'
      ? `the ${formatNumber(difference)}-point difference the design named`
      : `a ${formatNumber(difference)}-point difference (the largest seen so far)`
  const planning =
    `with an SD of ${formatNumber(sd)} points so far, ${plan.n ?? 'over 100,000'} complete ` +
    `players would find ${what} on ${attribute} with ${Math.round(power * 100)}% power ` +
    `(α ${formatNumber(alpha, 2)} over ${m} ${m === 1 ? 'pair' : 'pairs'})`
  const sentence =
    more === null
      ? `${capitalise(planning)}.`
      : more === 0
        ? `${capitalise(planning)}: the ${complete} complete so far are enough for that plan.`
        : `${capitalise(planning)}: ${more} more than the ${complete} complete so far.`
  return {
    ...withSpread,
    alphaPerPair,
    powerNow,
    needed: plan.n,
    more,
    sentence,
    reason: plan.reason,
  }
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1)
}
