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
}

/**
 * Spectral centroid in Hz, the brightness proxy: the magnitude-weighted mean frequency of the
 * magnitude spectra summed over the active frames (Hann, ~40 ms, at most 400 evenly spread).
 * Summing spectra rather than averaging per-frame centroids lets loud frames count more, as they
 * do for the ear, and keeps near-silent frames from adding noise. Null when no frame passes.
 */
export function spectralCentroid(
  samples: Float32Array,
  sampleRate: number,
  options: CentroidOptions = {},
): number | null {
  const { relativeGateDb = -40, absoluteGateDbfs = -70, minHz = 20, maxFrames = 400 } = options
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
  const summed = new Float64Array(size / 2 + 1)
  const active: number[] = []
  for (let f = 0; f < energies.length; f++) if (energies[f] >= gate) active.push(f)
  const count = Math.min(maxFrames, active.length)
  for (let n = 0; n < count; n++) {
    const start = active[Math.floor((n * active.length) / count)] * hop
    for (let i = 0; i < size; i++) frame[i] = samples[start + i] * window[i]
    fft.realTransform(spectrum, frame)
    for (let k = 0; k <= size / 2; k++) {
      const re = spectrum[2 * k]
      const im = spectrum[2 * k + 1]
      summed[k] += Math.sqrt(re * re + im * im)
    }
  }
  const firstBin = Math.max(1, Math.ceil((minHz * size) / sampleRate))
  let weighted = 0
  let total = 0
  for (let k = firstBin; k <= size / 2; k++) {
    weighted += ((k * sampleRate) / size) * summed[k]
    total += summed[k]
  }
  return total > 0 ? weighted / total : null
}
