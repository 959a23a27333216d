export interface WaveformPeaks {
  /** Lowest sample per bucket over all channels. */
  min: number[]
  /** Highest sample per bucket over all channels. */
  max: number[]
}

/**
 * Min/max per bucket for drawing a waveform, rounded to 4 decimals (finer than any screen) to
 * keep the JSON small. Fewer buckets than asked when the clip has fewer samples.
 */
export function waveformPeaks(channels: readonly Float32Array[], buckets = 1000): WaveformPeaks {
  const length = channels[0]?.length ?? 0
  const count = Math.max(0, Math.min(buckets, length))
  const min: number[] = new Array(count)
  const max: number[] = new Array(count)
  for (let b = 0; b < count; b++) {
    const start = Math.floor((b * length) / count)
    const end = Math.floor(((b + 1) * length) / count)
    let lo = Infinity
    let hi = -Infinity
    for (const channel of channels) {
      for (let i = start; i < end; i++) {
        const v = channel[i]
        if (v < lo) lo = v
        if (v > hi) hi = v
      }
    }
    min[b] = round4(lo)
    max[b] = round4(hi)
  }
  return { min, max }
}

function round4(value: number): number {
  return Math.round(value * 10_000) / 10_000 || 0
}
