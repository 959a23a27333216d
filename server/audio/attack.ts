export interface AttackOptions {
  /** The note has begun once its level is within this many dB of its steady level. */
  onsetBelowSteadyDb?: number
  /** The note has spoken once its level is within this many dB of its steady level. */
  withinSteadyDb?: number
  /** How long after the note first nears the clip's loudest level to look for its steady level. */
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

// How near the clip's loudest level a first note comes, at least: it finds the first note.
const FIRST_NOTE_DB = 20

/**
 * Attack time of the first note, the bow-response proxy, measured on the note itself so that
 * whatever comes before it (no lead-in, a second of silence, room noise) does not move it.
 *
 * The level is the mean square over a 20 ms window centred on each millisecond; before the
 * clip's first sample the window counts silence, so a clip that starts on the note reads as
 * one that starts after a pause. The first note is where the level first comes within 20 dB of
 * the clip's loudest moment; its steady level is its highest level in the second after that.
 * The attack ends when the level first comes within 3 dB of the steady level, and it began
 * where the level last rose through 20 dB below the steady level before that: the rise of the
 * note itself, from a tenth of its steady amplitude to within 3 dB of it. A string that speaks
 * sooner has a shorter attack. Room noise only matters if it is within 20 dB of the note.
 * Level alone is used (not periodicity) so that the number is simple to explain and does not
 * depend on a pitch tracker's thresholds. Null when the clip never rises above −70 dBFS.
 */
export function attackTime(
  samples: Float32Array,
  sampleRate: number,
  options: AttackOptions = {},
): AttackResult | null {
  const {
    onsetBelowSteadyDb = 20,
    withinSteadyDb = 3,
    steadyWindowSeconds = 1,
    levelWindowSeconds = 0.02,
  } = options
  const hop = Math.max(1, Math.round(sampleRate / 1000))
  const span = Math.max(2, Math.round((levelWindowSeconds * sampleRate) / hop))
  const half = Math.floor(span / 2)
  // Energy per hop, with half a window of silence before the first sample and after the last,
  // so that every millisecond of the clip has a window centred on it.
  const hops = Math.floor(samples.length / hop)
  const perHop = new Float64Array(hops + 2 * half)
  for (let k = 0; k < hops; k++) {
    let sum = 0
    for (let i = k * hop, end = i + hop; i < end; i++) sum += samples[i] * samples[i]
    perHop[half + k] = sum
  }
  const count = perHop.length - span + 1
  if (hops === 0 || count <= 0) return null
  // power[k]: mean square of the window centred on hop k of the clip.
  const power = new Float64Array(count)
  let running = 0
  for (let k = 0; k < span; k++) running += perHop[k]
  for (let k = 0; k < count; k++) {
    power[k] = running / (span * hop)
    if (k + span < perHop.length) running += perHop[k + span] - perHop[k]
  }

  let loudest = 0
  for (const p of power) loudest = Math.max(loudest, p)
  if (loudest < 1e-7) return null
  const firstNote = power.findIndex((p) => p >= loudest * 10 ** (-FIRST_NOTE_DB / 10))
  const windowEnd = Math.min(
    count,
    firstNote + Math.round((steadyWindowSeconds * sampleRate) / hop),
  )
  let steady = 0
  for (let k = firstNote; k < windowEnd; k++) steady = Math.max(steady, power[k])
  const spokenLevel = steady * 10 ** (-withinSteadyDb / 10)
  let spoken = firstNote
  while (power[spoken] < spokenLevel) spoken++
  const onsetLevel = steady * 10 ** (-onsetBelowSteadyDb / 10)
  let onset = spoken
  while (onset > 0 && power[onset - 1] >= onsetLevel) onset--

  const secondsPerHop = hop / sampleRate
  return {
    onsetSeconds: onset * secondsPerHop,
    attackSeconds: (spoken - onset) * secondsPerHop,
    steadyLevelDbfs: 10 * Math.log10(steady),
  }
}
