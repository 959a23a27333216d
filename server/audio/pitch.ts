import { analysisFrameSize, fftOfSize, frameEnergies, nextPowerOfTwo } from './fft.ts'

export interface PitchOptions {
  /** Lowest f0 searched; the default reaches below a five-string bass's low B (30.9 Hz). */
  minHz?: number
  /** Highest f0 searched; the default covers the top of the violin's range. */
  maxHz?: number
  /** YIN's absolute threshold on the normalised difference. */
  threshold?: number
  /** Frames analysed, spread evenly over the active part of the clip. */
  maxFrames?: number
}

export interface PitchEstimate {
  f0Hz: number
  /** Median of YIN's normalised difference at the chosen lag: 0 is perfectly periodic. */
  aperiodicity: number
  voicedFrames: number
}

export interface FramePitch {
  f0Hz: number
  aperiodicity: number
}

/**
 * YIN (de Cheveigné and Kawahara, 2002) on one frame starting at `start`: the difference
 * function, its cumulative-mean normalisation, the first dip under the threshold and a
 * parabolic refinement. The difference function is built from an FFT cross-correlation, which
 * makes low bass lags as cheap as violin ones. Null when the frame does not fit or has no dip.
 */
export function yinFrame(
  samples: Float32Array,
  start: number,
  sampleRate: number,
  options: PitchOptions = {},
): FramePitch | null {
  const { minHz = 27.5, maxHz = 4200, threshold = 0.15 } = options
  const width = analysisFrameSize(sampleRate)
  const maxLag = Math.min(Math.ceil(sampleRate / minHz), width)
  const minLag = Math.max(2, Math.floor(sampleRate / maxHz))
  const span = width + maxLag + 1
  if (start < 0 || start + span > samples.length) return null

  const size = nextPowerOfTwo(span)
  const fft = fftOfSize(size)
  const whole = new Float64Array(size)
  const head = new Float64Array(size)
  for (let i = 0; i < span; i++) whole[i] = samples[start + i]
  for (let i = 0; i < width; i++) head[i] = whole[i]
  const a = fft.createComplexArray() as number[]
  const b = fft.createComplexArray() as number[]
  fft.realTransform(a, whole)
  fft.completeSpectrum(a)
  fft.realTransform(b, head)
  fft.completeSpectrum(b)
  // conj(B)·A, whose inverse is the correlation of the first `width` samples with every lag.
  for (let k = 0; k < size; k++) {
    const ar = a[2 * k]
    const ai = a[2 * k + 1]
    const br = b[2 * k]
    const bi = b[2 * k + 1]
    a[2 * k] = br * ar + bi * ai
    a[2 * k + 1] = br * ai - bi * ar
  }
  const correlation = fft.createComplexArray() as number[]
  fft.inverseTransform(correlation, a)

  const prefix = new Float64Array(span + 1)
  for (let i = 0; i < span; i++) prefix[i + 1] = prefix[i] + whole[i] * whole[i]
  const energyAt = (lag: number) => prefix[lag + width] - prefix[lag]
  const e0 = energyAt(0)
  if (e0 <= 0) return null

  const normalised = new Float64Array(maxLag + 2)
  normalised[0] = 1
  let running = 0
  for (let lag = 1; lag <= maxLag + 1 && lag + width <= span; lag++) {
    const d = Math.max(0, e0 + energyAt(lag) - 2 * correlation[2 * lag])
    running += d
    normalised[lag] = running > 0 ? (d * lag) / running : 1
  }

  let best = -1
  for (let lag = minLag; lag <= maxLag; lag++) {
    if (normalised[lag] < threshold) {
      while (lag + 1 <= maxLag && normalised[lag + 1] < normalised[lag]) lag++
      best = lag
      break
    }
  }
  if (best < 0) {
    // No clear dip: take the deepest one, and let the caller judge it by its aperiodicity.
    best = minLag
    for (let lag = minLag; lag <= maxLag; lag++) {
      if (normalised[lag] < normalised[best]) best = lag
    }
  }
  const before = normalised[best - 1]
  const at = normalised[best]
  const after = normalised[best + 1]
  const curvature = before - 2 * at + after
  const shift = curvature > 0 ? (0.5 * (before - after)) / curvature : 0
  return { f0Hz: sampleRate / (best + shift), aperiodicity: at }
}

/**
 * The clip's fundamental: the median of YIN estimates over frames spread across the active part
 * (within 30 dB of the loudest frame), keeping only frames clearly periodic. For a passage of
 * several notes this is the central pitch, not a melody. Null when too few frames are periodic.
 */
export function estimateF0(
  samples: Float32Array,
  sampleRate: number,
  options: PitchOptions = {},
): PitchEstimate | null {
  const { maxFrames = 24 } = options
  const width = analysisFrameSize(sampleRate)
  const energies = frameEnergies(samples, width, width)
  let loudest = 0
  for (const e of energies) loudest = Math.max(loudest, e)
  if (loudest <= 1e-10) return null
  const active: number[] = []
  energies.forEach((e, f) => {
    if (e >= loudest * 1e-3) active.push(f)
  })
  const picks = new Set<number>()
  const count = Math.min(maxFrames, active.length)
  for (let i = 0; i < count; i++) picks.add(active[Math.floor(((i + 0.5) * active.length) / count)])

  const voiced: FramePitch[] = []
  for (const f of picks) {
    const pitch = yinFrame(samples, f * width, sampleRate, options)
    if (pitch && pitch.aperiodicity < 0.35) voiced.push(pitch)
  }
  if (voiced.length === 0) return null
  return {
    f0Hz: median(voiced.map((p) => p.f0Hz)),
    aperiodicity: median(voiced.map((p) => p.aperiodicity)),
    voicedFrames: voiced.length,
  }
}

function median(values: number[]): number {
  const sorted = [...values].sort((x, y) => x - y)
  const mid = sorted.length >> 1
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2
}
