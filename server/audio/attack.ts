export interface AttackOptions {
  /** The onset is where the level first comes within this many dB of the clip's loudest moment. */
  onsetBelowPeakDb?: number
  /** The note has spoken once its level is within this many dB of its steady level. */
  withinSteadyDb?: number
  /** How long after the onset to look for the first note's steady level. */
  steadyWindowSeconds?: number
  /** Level-meter window; the default suits every string's range, longer smooths low notes. */
  levelWindowSeconds?: number
}

export interface AttackResult {
  /** Time of the onset from the start of the clip. */
  onsetSeconds: number
  /** Attack time: from the onset to the moment the note reaches its steady level. */
  attackSeconds: number
  /** The first note's steady level (RMS, dBFS). */
  steadyLevelDbfs: number
}

/**
 * Attack time of the first note, the bow-response proxy. The level is the RMS over a 20 ms
 * window moved in 1 ms steps. The onset is the first moment that level comes within 40 dB of the
 * loudest moment of the clip (or 10 dB above the quietest moment, the noise floor, if that is
 * higher); the note's steady level is its highest level in the second after
 * the onset; the attack ends when the level first comes within 3 dB of that steady level.
 * A string that speaks sooner has a shorter attack. The meter window sees a rise before its
 * centre does, so a sharp onset reads up to half a window (10 ms) early; the bias is the same for
 * every clip and cancels in comparisons. Level alone is used (not periodicity) so that
 * the number is simple to explain and does not depend on a pitch tracker's thresholds.
 * Null when the clip never rises above −70 dBFS.
 */
export function attackTime(
  samples: Float32Array,
  sampleRate: number,
  options: AttackOptions = {},
): AttackResult | null {
  const {
    onsetBelowPeakDb = 40,
    withinSteadyDb = 3,
    steadyWindowSeconds = 1,
    levelWindowSeconds = 0.02,
  } = options
  const hop = Math.max(1, Math.round(sampleRate / 1000))
  const hops = Math.floor(samples.length / hop)
  const perHop = new Float64Array(hops)
  for (let k = 0; k < hops; k++) {
    let sum = 0
    for (let i = k * hop, end = i + hop; i < end; i++) sum += samples[i] * samples[i]
    perHop[k] = sum
  }
  const span = Math.max(1, Math.round((levelWindowSeconds * sampleRate) / hop))
  const count = hops - span + 1
  if (count <= 0) return null
  // Mean square of the window that starts at each hop.
  const power = new Float64Array(count)
  let running = 0
  for (let k = 0; k < span; k++) running += perHop[k]
  for (let k = 0; k < count; k++) {
    power[k] = running / (span * hop)
    if (k + span < hops) running += perHop[k + span] - perHop[k]
  }

  let loudest = 0
  for (const p of power) loudest = Math.max(loudest, p)
  if (loudest < 1e-7) return null
  let quietest = loudest
  for (const p of power) quietest = Math.min(quietest, p)
  // A noisy room can sit less than 40 dB below the playing; the onset must rise out of it.
  const onsetPower = Math.max(loudest * 10 ** (-onsetBelowPeakDb / 10), quietest * 10)
  const onset = power.findIndex((p) => p >= onsetPower)
  const windowEnd = Math.min(count, onset + Math.round((steadyWindowSeconds * sampleRate) / hop))
  let steady = 0
  for (let k = onset; k < windowEnd; k++) steady = Math.max(steady, power[k])
  const target = steady * 10 ** (-withinSteadyDb / 10)
  let spoken = onset
  while (power[spoken] < target) spoken++

  const secondsPerHop = hop / sampleRate
  return {
    onsetSeconds: onset * secondsPerHop + levelWindowSeconds / 2,
    attackSeconds: (spoken - onset) * secondsPerHop,
    steadyLevelDbfs: 10 * Math.log10(steady),
  }
}
