// ln(10^3)/π: the "2.2" of η = 2.2/(f·T60), kept exact so that η is precisely 1/Q.
const LN_1000 = Math.log(1000)

export interface DecayOptions {
  /** Only this band (Hz), e.g. around f0, so faster-dying partials cannot bend the curve. */
  band?: readonly [number, number]
}

export interface DecayResult {
  t60Seconds: number
  /** ISO 3382-1 evaluation range used: T30 (−5…−35 dB) when the range allows, else T20. */
  method: 'T20' | 'T30'
  slopeDbPerSecond: number
  /** Correlation of the straight-line fit; close to −1 for a clean exponential decay. */
  fitCorrelation: number
  /** From the strongest part of the decay down to the noise floor or the end of the clip. */
  dynamicRangeDb: number
  /** Where the decay starts (the energy peak), in seconds from the start of the clip. */
  startSeconds: number
}

/** η = 2.2/(f·T60) (the loss factor, the reciprocal of Q). */
export function lossFactor(frequencyHz: number, t60Seconds: number): number {
  return LN_1000 / (Math.PI * frequencyHz * t60Seconds)
}

/** Q = π·f·T60/6.908. */
export function qualityFactor(frequencyHz: number, t60Seconds: number): number {
  return (Math.PI * frequencyHz * t60Seconds) / LN_1000
}

interface BandPassCoefficients {
  b0: number
  a1: number
  a2: number
}

/**
 * Second-order band-pass (Audio EQ Cookbook form, 0 dB at the centre; b1 = 0 and b2 = −b0).
 * Run twice, the octave above the band is about 20 dB down; its own ringing lasts tens of
 * milliseconds, far below string decay times.
 */
function bandPassCoefficients(sampleRate: number, band: readonly [number, number]) {
  const centre = Math.sqrt(band[0] * band[1])
  const octaves = Math.log2(band[1] / band[0])
  const w0 = (2 * Math.PI * centre) / sampleRate
  const alpha = Math.sin(w0) * Math.sinh(((Math.LN2 / 2) * octaves * w0) / Math.sin(w0))
  const a0 = 1 + alpha
  return { b0: alpha / a0, a1: (-2 * Math.cos(w0)) / a0, a2: (1 - alpha) / a0 }
}

/** The signal through the band-pass, run twice. */
export function bandPass(
  samples: Float32Array,
  sampleRate: number,
  band: readonly [number, number],
): Float32Array {
  const out = new Float32Array(samples.length)
  windowEnergies(samples, sampleRate, 1, band, out)
  return out
}

/**
 * Energy per window of `windowSize` samples, optionally through the band-pass run twice. The
 * filters and the summing share one loop so a long ring-out costs no extra copies.
 */
function windowEnergies(
  samples: Float32Array,
  sampleRate: number,
  windowSize: number,
  band?: readonly [number, number],
  filtered?: Float32Array,
): Float64Array {
  const count = Math.floor(samples.length / windowSize)
  const energy = new Float64Array(count)
  const c: BandPassCoefficients | undefined = band && bandPassCoefficients(sampleRate, band)
  let x1 = 0
  let x2 = 0
  let m1 = 0
  let m2 = 0
  let y1 = 0
  let y2 = 0
  let i = 0
  for (let k = 0; k < count; k++) {
    let sum = 0
    for (const end = i + windowSize; i < end; i++) {
      let y = samples[i]
      if (c) {
        const x = y
        const m = c.b0 * (x - x2) - c.a1 * m1 - c.a2 * m2
        y = c.b0 * (m - m2) - c.a1 * y1 - c.a2 * y2
        x2 = x1
        x1 = x
        m2 = m1
        m1 = m
        y2 = y1
        y1 = y
      }
      if (filtered) filtered[i] = y
      sum += y * y
    }
    energy[k] = sum
  }
  return energy
}

/**
 * Schroeder backward integration (ISO 3382-1): the energy still to come after each moment, in dB
 * relative to the total. `energy` holds energy per short window; the result has one value per
 * window. `noisePerWindow` is subtracted first (Chu's correction), so that a steady noise floor
 * does not flatten the end of the curve.
 */
export function schroederCurve(energy: Float64Array, noisePerWindow = 0): Float64Array {
  const curve = new Float64Array(energy.length)
  let remaining = 0
  for (let k = energy.length - 1; k >= 0; k--) {
    remaining += energy[k] - noisePerWindow
    curve[k] = remaining
  }
  const total = curve[0]
  for (let k = 0; k < curve.length; k++) {
    curve[k] = curve[k] > 0 && total > 0 ? 10 * Math.log10(curve[k] / total) : -Infinity
  }
  return curve
}

/**
 * Reverberation-style decay time of a ring-out. The energy is summed in 1 ms windows from the
 * loudest window on; the noise floor is the mean of the last tenth of the clip when that tenth is
 * flat (a decay still under way is not noise and is left alone). The Schroeder curve is fitted
 * by least squares over −5…−35 dB (T30) when the floor lies 45 dB or more below the start, else
 * over −5…−25 dB (T20) when it lies 35 dB below, and extrapolated to 60 dB. Null when the clip
 * offers less range than that or the decay is too short to fit.
 */
export function decayTime(
  samples: Float32Array,
  sampleRate: number,
  options: DecayOptions = {},
): DecayResult | null {
  const windowSize = Math.max(1, Math.round(sampleRate / 1000))
  const windowSeconds = windowSize / sampleRate
  const all = windowEnergies(samples, sampleRate, windowSize, options.band)
  const count = all.length
  let peak = 0
  for (let k = 1; k < count; k++) if (all[k] > all[peak]) peak = k
  const energy = all.subarray(peak)
  const tailLength = Math.floor(energy.length / 10)
  if (tailLength < 20) return null

  const tail = energy.subarray(energy.length - tailLength)
  const half = tailLength >> 1
  const firstHalf = mean(tail.subarray(0, half))
  const secondHalf = mean(tail.subarray(half))
  const tailIsFloor = firstHalf < 2 * secondHalf
  const floor = mean(tail)
  // The start level is smoothed over 10 ms so a single ripple of a low note does not set it.
  const startLevel = mean(energy.subarray(0, Math.min(10, energy.length)))
  const dynamicRangeDb = 10 * Math.log10(startLevel / Math.max(floor, 1e-30))

  let method: DecayResult['method']
  let bottom: number
  if (dynamicRangeDb >= 45) [method, bottom] = ['T30', -35]
  else if (dynamicRangeDb >= 35) [method, bottom] = ['T20', -25]
  else return null

  const curve = schroederCurve(energy, tailIsFloor ? floor : 0)
  const first = curve.findIndex((db) => db <= -5)
  const last = curve.findIndex((db) => db <= bottom)
  if (first < 0 || last < 0 || last - first < 5) return null

  const fit = linearFit(curve, first, last, windowSeconds)
  if (!(fit.slope < 0)) return null
  return {
    t60Seconds: -60 / fit.slope,
    method,
    slopeDbPerSecond: fit.slope,
    fitCorrelation: fit.correlation,
    dynamicRangeDb,
    startSeconds: peak * windowSeconds,
  }
}

function mean(values: Float64Array): number {
  let sum = 0
  for (const v of values) sum += v
  return values.length ? sum / values.length : 0
}

function linearFit(values: Float64Array, from: number, to: number, step: number) {
  let sx = 0
  let sy = 0
  let sxx = 0
  let syy = 0
  let sxy = 0
  const n = to - from + 1
  for (let k = from; k <= to; k++) {
    const x = k * step
    const y = values[k]
    sx += x
    sy += y
    sxx += x * x
    syy += y * y
    sxy += x * y
  }
  const covariance = sxy - (sx * sy) / n
  const varianceX = sxx - (sx * sx) / n
  const varianceY = syy - (sy * sy) / n
  return {
    slope: covariance / varianceX,
    correlation: covariance / Math.sqrt(varianceX * varianceY),
  }
}
