import * as waveResampler from 'wave-resampler'

type Resample = typeof waveResampler.resample

/*
 * The package ships a CommonJS build (what Node loads: the function sits on the default export)
 * and an ES build (what Vite loads in the tests: a named export), so take it from either.
 */
const resample: Resample =
  (waveResampler as { resample?: Resample }).resample ??
  (waveResampler as unknown as { default: { resample: Resample } }).default.resample

/**
 * One channel at another sample rate: windowed-sinc interpolation behind a zero-phase low-pass at
 * the lower of the two Nyquist frequencies, so nothing above it folds back as aliasing. The
 * length is whatever the ratio gives (give or take a frame); callers fit it to the length they
 * need. Samples at the same rate come back as they are.
 */
export function resampleChannel(
  samples: Float32Array,
  fromRate: number,
  toRate: number,
): Float32Array {
  if (fromRate === toRate) return samples
  // The library filters its input in place when lowering the rate: give it a copy.
  const out = resample(Float64Array.from(samples), fromRate, toRate, {
    method: 'sinc',
    LPF: true,
  })
  return Float32Array.from(out)
}

export function resampleChannels(
  channels: readonly Float32Array[],
  fromRate: number,
  toRate: number,
): Float32Array[] {
  return channels.map((c) => resampleChannel(c, fromRate, toRate))
}
