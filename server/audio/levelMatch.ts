import { gatedLoudness } from './loudness.ts'

/*
 * Gains that bring renditions to a loudness exactly, by measuring rather than assuming. The
 * BS.1770 gates are fixed levels, so turning a ring-out down sinks more of its tail below the
 * absolute gate (and turning it up lifts more above it): its reading moves by more or less than
 * the gain, and a gain worked out as target minus loudness misses by a few tenths of a LU.
 */

/** How close a rendition must come to its target. */
export const LEVEL_TOLERANCE_LU = 0.05
/**
 * The search stops once this close: well inside the tolerance, so that members of one set agree
 * with each other to within a hundredth of a LU as well.
 */
export const LEVEL_AIM_LU = 0.002
const MAX_ITERATIONS = 12
// Rounds of lowering a set: the first lowering nearly always settles it.
const MAX_ROUNDS = 4

export interface GainSolution {
  gainDb: number
  /** The gated loudness at that gain. */
  loudnessLufs: number
  iterations: number
}

/** The meter's reading of blocks at a gain in dB. */
export const loudnessAt = (blocks: Float64Array, gainDb: number) =>
  gatedLoudness(blocks, 10 ** (gainDb / 10))

/**
 * The gain that brings loudness blocks (from loudnessBlocks) to `targetLufs`: measure, correct
 * by the miss, repeat. Between the gain steps where a block crosses a gate, loudness rises dB for
 * dB with gain, so one correction usually lands; where the miss changes sign the search keeps
 * the gains on either side and halves between them, since a block crossing a gate makes the
 * reading jump. Returns the best gain found within the iteration cap.
 */
export function gainForLoudness(
  blocks: Float64Array,
  targetLufs: number,
  startGainDb = 0,
): GainSolution {
  const first = loudnessAt(blocks, startGainDb)
  if (!Number.isFinite(first)) throw new Error('A silent rendition cannot be level-matched')
  let gain = startGainDb + (targetLufs - first)
  let best: GainSolution = { gainDb: startGainDb, loudnessLufs: first, iterations: 0 }
  let low = -Infinity
  let high = Infinity
  for (let i = 1; i <= MAX_ITERATIONS; i++) {
    const loudness = loudnessAt(blocks, gain)
    const miss = targetLufs - loudness
    if (Math.abs(miss) < Math.abs(targetLufs - best.loudnessLufs))
      best = { gainDb: gain, loudnessLufs: loudness, iterations: i }
    if (Math.abs(miss) <= LEVEL_AIM_LU) break
    if (miss > 0) low = Math.max(low, gain)
    else high = Math.min(high, gain)
    const next = gain + miss
    gain = next > low && next < high ? next : (low + high) / 2
    if (!Number.isFinite(gain)) break
  }
  return { ...best, iterations: Math.max(best.iterations, 1) }
}

export interface SetLevelInput {
  blocks: Float64Array
  /** Sample peak of the rendition before gain. */
  peakDbfs: number
}

export interface SetLevels {
  /** The loudness every member reaches: the target, or lower when a peak forced the set down. */
  targetLufs: number
  gainsDb: number[]
  loudnessLufs: number[]
}

/**
 * Gains for a matched set: each member brought to the target; when any would then peak above
 * the ceiling, the whole set's target comes down by that much and every gain is found again
 * (the gates make the new gains differ from the old by not quite the same amount), until no
 * member peaks over. Players must hear the strings, not a level difference, so no member is
 * limited on its own; only after the rounds would a last sliver (inside the tolerance) be taken
 * off the one member still over.
 */
export function matchSetLevels(
  members: readonly SetLevelInput[],
  targetLufs: number,
  ceilingDbfs: number,
): SetLevels {
  let target = targetLufs
  let solutions: GainSolution[] = []
  for (let round = 0; ; round++) {
    solutions = members.map((m) => gainForLoudness(m.blocks, target))
    const over = Math.max(...members.map((m, i) => m.peakDbfs + solutions[i].gainDb - ceilingDbfs))
    if (over <= 0 || round === MAX_ROUNDS) break
    target -= over
  }
  const gainsDb = members.map((m, i) => Math.min(solutions[i].gainDb, ceilingDbfs - m.peakDbfs))
  return {
    targetLufs: target,
    gainsDb,
    loudnessLufs: members.map((m, i) =>
      gainsDb[i] === solutions[i].gainDb
        ? solutions[i].loudnessLufs
        : loudnessAt(m.blocks, gainsDb[i]),
    ),
  }
}
