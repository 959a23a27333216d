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

/**
 * `mixToMono` written over the first channel, for samples nobody else holds: the same numbers,
 * without a new array the length of the clip.
 */
export function mixToMonoInPlace(channels: readonly Float32Array[]): Float32Array {
  const [mono, ...rest] = channels
  if (rest.length === 0) return mono
  const length = mono.length
  if (rest.length === 1) {
    const [right] = rest
    for (let i = 0; i < length; i++) mono[i] = 0.5 * (mono[i] + right[i])
    return mono
  }
  // mixToMono sums into zeros; 0 + x only differs from x for −0, which no measure can tell.
  for (const channel of rest) {
    for (let i = 0; i < length; i++) mono[i] += channel[i]
  }
  const scale = 1 / channels.length
  for (let i = 0; i < length; i++) mono[i] *= scale
  return mono
}
