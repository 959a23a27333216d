export function dbToGain(db: number): number {
  return 10 ** (db / 20)
}

export function gainToDb(gain: number): number {
  return 20 * Math.log10(gain)
}

/** Largest absolute sample over all channels, in dB relative to digital full scale. */
export function samplePeakDbfs(channels: readonly Float32Array[]): number {
  let peak = 0
  for (const channel of channels) {
    for (let i = 0; i < channel.length; i++) {
      const v = channel[i] < 0 ? -channel[i] : channel[i]
      if (v > peak) peak = v
    }
  }
  return gainToDb(peak)
}

/** The channels averaged into one, for measures that describe the sound rather than the image. */
export function mixToMono(channels: readonly Float32Array[]): Float32Array {
  if (channels.length === 1) return channels[0]
  const length = channels[0]?.length ?? 0
  const mono = new Float32Array(length)
  if (channels.length === 2) {
    const [left, right] = channels
    for (let i = 0; i < length; i++) mono[i] = 0.5 * (left[i] + right[i])
    return mono
  }
  for (const channel of channels) {
    for (let i = 0; i < length; i++) mono[i] += channel[i]
  }
  const scale = 1 / channels.length
  for (let i = 0; i < length; i++) mono[i] *= scale
  return mono
}
