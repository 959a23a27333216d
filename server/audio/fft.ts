import FFT from 'fft.js'

const cache = new Map<number, FFT>()

/** fft.js precomputes tables per size; analysis reuses a handful of sizes, so keep them. */
export function fftOfSize(size: number): FFT {
  let fft = cache.get(size)
  if (!fft) {
    fft = new FFT(size)
    cache.set(size, fft)
  }
  return fft
}

export function nextPowerOfTwo(n: number): number {
  return 2 ** Math.ceil(Math.log2(Math.max(2, n)))
}

/** About 40 ms at any rate (2048 samples at 44.1 and 48 kHz): fine in both time and pitch. */
export function analysisFrameSize(sampleRate: number): number {
  return nextPowerOfTwo(0.04 * sampleRate)
}

export function hannWindow(size: number): Float64Array {
  const w = new Float64Array(size)
  for (let i = 0; i < size; i++) w[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / size)
  return w
}

/** Mean square of each frame of `size` samples starting every `hop` samples. */
export function frameEnergies(samples: Float32Array, size: number, hop: number): Float64Array {
  const count = samples.length >= size ? Math.floor((samples.length - size) / hop) + 1 : 0
  const out = new Float64Array(count)
  for (let f = 0; f < count; f++) {
    let sum = 0
    for (let i = f * hop, end = i + size; i < end; i++) sum += samples[i] * samples[i]
    out[f] = sum / size
  }
  return out
}
