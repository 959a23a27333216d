import { analysisFrameSize, fftOfSize, frameEnergies, hannWindow } from './fft.ts'

export interface CentroidOptions {
  /** Frames quieter than the loudest frame by more than this are left out. */
  relativeGateDb?: number
  /** Frames below this level are left out however loud the rest is. */
  absoluteGateDbfs?: number
  /** Bins below this are ignored so that DC offset and rumble do not pull the value down. */
  minHz?: number
  /**
   * At most this many active frames, evenly spread, are transformed: a few hundred already fix
   * the long-term spectrum, and long clips then cost no more than short ones.
   */
  maxFrames?: number
  /** A bin counts only this far above its noise floor, summed over the active frames. */
  aboveFloorDb?: number
  /** Quiet frames needed before a noise floor is estimated at all. */
  minFloorFrames?: number
}

/**
 * Spectral centroid in Hz, the brightness proxy, defined so that a room's noise floor does not
 * pull it up: the power-weighted mean frequency of the power spectra (Hann, ~40 ms frames, at
 * most 400 evenly spread) summed over the active frames, after the noise floor is taken out:
 *
 *   c = Σ_k f_k · P̂_k / Σ_k P̂_k,   P̂_k = Σ_frames max(0, |X_k|² − F_k),   and only bins with
 *   Σ_frames |X_k|² at least `aboveFloorDb` above Σ_frames F_k count,
 *
 * where F_k, the floor in bin k, is the median power of bin k over the clip's quiet frames (those
 * below the frame gate: the lead-in, the gaps, the end of a ring-out), or 0 when the clip has
 * fewer than `minFloorFrames` of them. Weighting by power (not magnitude) lets the partials
 * that carry the sound outweigh thousands of bins of faint noise; subtracting the floor and
 * leaving out bins near it removes what is left. Summing spectra rather than averaging per-frame
 * centroids lets loud frames count more, as they do for the ear. Null when no frame passes.
 */
export function spectralCentroid(
  samples: Float32Array,
  sampleRate: number,
  options: CentroidOptions = {},
): number | null {
  const {
    relativeGateDb = -40,
    absoluteGateDbfs = -70,
    minHz = 20,
    maxFrames = 400,
    aboveFloorDb = 10,
    minFloorFrames = 5,
  } = options
  const size = analysisFrameSize(sampleRate)
  // No overlap: the long-term spectrum gains little from it, and it would double the cost.
  const hop = size
  const energies = frameEnergies(samples, size, hop)
  let loudest = 0
  for (const e of energies) loudest = Math.max(loudest, e)
  const gate = Math.max(loudest * 10 ** (relativeGateDb / 10), 10 ** (absoluteGateDbfs / 10))
  if (loudest === 0 || loudest < gate) return null

  const fft = fftOfSize(size)
  const window = hannWindow(size)
  const frame = new Float64Array(size)
  const spectrum = fft.createComplexArray() as number[]
  const bins = size / 2 + 1
  /** Power spectrum of the frame starting at `start`, into `into`. */
  const powerOf = (start: number, into: Float64Array) => {
    for (let i = 0; i < size; i++) frame[i] = samples[start + i] * window[i]
    fft.realTransform(spectrum, frame)
    for (let k = 0; k < bins; k++) {
      const re = spectrum[2 * k]
      const im = spectrum[2 * k + 1]
      into[k] = re * re + im * im
    }
  }
  const spread = (frames: number[], most: number) => {
    const count = Math.min(most, frames.length)
    return Array.from({ length: count }, (_, n) => frames[Math.floor((n * frames.length) / count)])
  }

  const active: number[] = []
  const quiet: number[] = []
  for (let f = 0; f < energies.length; f++) {
    if (energies[f] >= gate) active.push(f)
    else if (energies[f] > 0) quiet.push(f)
  }
  const chosen = spread(active, maxFrames)
  const floor = noiseFloor(spread(quiet, 64), minFloorFrames, bins, (f, into) =>
    powerOf(f * hop, into),
  )

  const summed = new Float64Array(bins)
  const cleaned = new Float64Array(bins)
  const power = new Float64Array(bins)
  for (const f of chosen) {
    powerOf(f * hop, power)
    for (let k = 0; k < bins; k++) {
      summed[k] += power[k]
      cleaned[k] += Math.max(0, power[k] - floor[k])
    }
  }
  const firstBin = Math.max(1, Math.ceil((minHz * size) / sampleRate))
  const margin = 10 ** (aboveFloorDb / 10)
  let weighted = 0
  let total = 0
  for (let k = firstBin; k < bins; k++) {
    if (floor[k] > 0 && summed[k] < margin * floor[k] * chosen.length) continue
    weighted += ((k * sampleRate) / size) * cleaned[k]
    total += cleaned[k]
  }
  return total > 0 ? weighted / total : null
}

/** Median power per bin over the quiet frames; zeros when there are too few to tell. */
function noiseFloor(
  frames: number[],
  minFrames: number,
  bins: number,
  powerOf: (frame: number, into: Float64Array) => void,
): Float64Array {
  const floor = new Float64Array(bins)
  if (frames.length < minFrames) return floor
  const powers = frames.map(() => new Float64Array(bins))
  frames.forEach((f, i) => powerOf(f, powers[i]))
  const column = new Float64Array(frames.length)
  for (let k = 0; k < bins; k++) {
    for (let i = 0; i < frames.length; i++) column[i] = powers[i][k]
    column.sort()
    const mid = column.length >> 1
    floor[k] = column.length % 2 ? column[mid] : (column[mid - 1] + column[mid]) / 2
  }
  return floor
}
