import { dbToGain } from './level.ts'
import { seededRandom } from '../../shared/seededRandom'

export { seededRandom }

// Test signals for the measures' tests and the demo seed. Everything is generated, so fixtures
// never need to be committed as binaries and every expected value can be computed.

export interface ToneBase {
  seconds: number
  sampleRate?: number
}

/** Gaussian white noise with the given RMS level. */
export function whiteNoise(options: ToneBase & { rmsDbfs: number; seed?: number }): Float32Array {
  const { seconds, sampleRate = 48_000, rmsDbfs, seed = 1 } = options
  const random = seededRandom(seed)
  const out = new Float32Array(Math.round(seconds * sampleRate))
  const sigma = dbToGain(rmsDbfs)
  for (let i = 0; i < out.length; i += 2) {
    // Box–Muller gives two independent values per pair of uniforms.
    const r = Math.sqrt(-2 * Math.log(1 - random())) * sigma
    const phi = 2 * Math.PI * random()
    out[i] = r * Math.cos(phi)
    if (i + 1 < out.length) out[i + 1] = r * Math.sin(phi)
  }
  return out
}

export function sine(
  options: ToneBase & { frequency: number; peakDbfs?: number; phase?: number },
): Float32Array {
  const { seconds, sampleRate = 48_000, frequency, peakDbfs = 0, phase = 0 } = options
  const out = new Float32Array(Math.round(seconds * sampleRate))
  const amplitude = dbToGain(peakDbfs)
  const w = (2 * Math.PI * frequency) / sampleRate
  for (let i = 0; i < out.length; i++) out[i] = amplitude * Math.sin(w * i + phase)
  return out
}

/** The same sine in both channels. */
export function stereoSine(
  options: ToneBase & { frequency: number; peakDbfs?: number },
): Float32Array[] {
  const left = sine(options)
  return [left, left.slice()]
}

/**
 * A sine whose level changes in steps, continuous in phase, as in loudness-meter test sequences.
 */
export function steppedSine(options: {
  frequency: number
  sampleRate?: number
  steps: ReadonlyArray<{ seconds: number; peakDbfs: number }>
}): Float32Array {
  const { frequency, sampleRate = 48_000, steps } = options
  const lengths = steps.map((s) => Math.round(s.seconds * sampleRate))
  const out = new Float32Array(lengths.reduce((a, b) => a + b, 0))
  const w = (2 * Math.PI * frequency) / sampleRate
  let i = 0
  steps.forEach((s, k) => {
    const amplitude = dbToGain(s.peakDbfs)
    for (const end = i + lengths[k]; i < end; i++) out[i] = amplitude * Math.sin(w * i)
  })
  return out
}

/**
 * An exponentially decaying carrier (a sine, or white noise when `frequency` is omitted) with
 * the given T60, optionally over a steady noise floor. The envelope is e^(−t/τ) with
 * T60 = ln(1000)·τ, so the energy falls 60 dB in exactly `t60` seconds.
 */
export function exponentialDecay(
  options: ToneBase & {
    t60: number
    frequency?: number
    peakDbfs?: number
    noiseFloorDbfs?: number
    seed?: number
  },
): Float32Array {
  const { seconds, sampleRate = 48_000, t60, frequency, peakDbfs = -1, seed = 7 } = options
  const length = Math.round(seconds * sampleRate)
  const carrier =
    frequency === undefined
      ? normalised(whiteNoise({ seconds, sampleRate, rmsDbfs: 0, seed }))
      : sine({ seconds, sampleRate, frequency })
  const tau = t60 / Math.log(1000)
  const amplitude = dbToGain(peakDbfs)
  const out = new Float32Array(length)
  for (let i = 0; i < length; i++) out[i] = amplitude * carrier[i] * Math.exp(-i / sampleRate / tau)
  if (options.noiseFloorDbfs !== undefined) {
    addInPlace(
      out,
      whiteNoise({ seconds, sampleRate, rmsDbfs: options.noiseFloorDbfs, seed: seed + 1 }),
    )
  }
  return out
}

/**
 * A bowed-like note: harmonics of `f0` (amplitude 1/n unless given) under an envelope that rises
 * linearly from silence to full level in `attackSeconds`, then holds. `delaySeconds` of silence
 * come first, as before a real downbow.
 */
export function bowedTone(
  options: ToneBase & {
    f0: number
    attackSeconds: number
    harmonicAmplitudes?: readonly number[]
    peakDbfs?: number
    delaySeconds?: number
  },
): Float32Array {
  const {
    seconds,
    sampleRate = 48_000,
    f0,
    attackSeconds,
    peakDbfs = -6,
    delaySeconds = 0,
  } = options
  const amplitudes = options.harmonicAmplitudes ?? [
    1,
    1 / 2,
    1 / 3,
    1 / 4,
    1 / 5,
    1 / 6,
    1 / 7,
    1 / 8,
  ]
  const tone = harmonicSum(f0, amplitudes, seconds, sampleRate, peakDbfs)
  const start = Math.round(delaySeconds * sampleRate)
  const ramp = Math.max(1, attackSeconds * sampleRate)
  const out = new Float32Array(start + tone.length)
  for (let i = 0; i < tone.length; i++) out[start + i] = tone[i] * Math.min(1, i / ramp)
  return out
}

/**
 * A plucked ring-out: harmonics of `f0` each decaying exponentially, the fundamental with T60 =
 * `t60` and harmonic n with `t60 / n` (upper partials die sooner, as on a real string), after
 * `delaySeconds` of silence, optionally over a noise floor.
 */
export function pluckedNote(
  options: ToneBase & {
    f0: number
    t60: number
    harmonics?: number
    peakDbfs?: number
    delaySeconds?: number
    noiseFloorDbfs?: number
    seed?: number
  },
): Float32Array {
  const { seconds, sampleRate = 48_000, f0, t60, harmonics = 6, peakDbfs = -3 } = options
  const start = Math.round((options.delaySeconds ?? 0) * sampleRate)
  const length = Math.round(seconds * sampleRate)
  const out = new Float32Array(start + length)
  let norm = 0
  for (let n = 1; n <= harmonics; n++) norm += 1 / n
  const amplitude = dbToGain(peakDbfs) / norm
  for (let n = 1; n <= harmonics && n * f0 < sampleRate / 2; n++) {
    const w = (2 * Math.PI * n * f0) / sampleRate
    const decayPerSample = Math.log(1000) / ((t60 / n) * sampleRate)
    for (let i = 0; i < length; i++) {
      out[start + i] += (amplitude / n) * Math.sin(w * i) * Math.exp(-decayPerSample * i)
    }
  }
  if (options.noiseFloorDbfs !== undefined) {
    const noise = whiteNoise({
      seconds: out.length / sampleRate,
      sampleRate,
      rmsDbfs: options.noiseFloorDbfs,
      seed: options.seed ?? 11,
    })
    addInPlace(out, noise)
  }
  return out
}

/** A sum of harmonics of `f0` scaled so that the waveform's peak sits at `peakDbfs`. */
export function harmonicSum(
  f0: number,
  amplitudes: readonly number[],
  seconds: number,
  sampleRate = 48_000,
  peakDbfs = -6,
): Float32Array {
  const out = new Float32Array(Math.round(seconds * sampleRate))
  amplitudes.forEach((amplitude, k) => {
    const w = (2 * Math.PI * (k + 1) * f0) / sampleRate
    if (amplitude === 0 || (k + 1) * f0 >= sampleRate / 2) return
    for (let i = 0; i < out.length; i++) out[i] += amplitude * Math.sin(w * i)
  })
  return normalised(out, peakDbfs)
}

function normalised(samples: Float32Array, peakDbfs = 0): Float32Array {
  let peak = 0
  for (const v of samples) peak = Math.max(peak, Math.abs(v))
  if (peak === 0) return samples
  const scale = dbToGain(peakDbfs) / peak
  for (let i = 0; i < samples.length; i++) samples[i] *= scale
  return samples
}

function addInPlace(target: Float32Array, source: Float32Array): void {
  for (let i = 0; i < target.length; i++) target[i] += source[i]
}
