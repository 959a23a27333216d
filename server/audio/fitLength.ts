/*
 * Bringing a take to its set's channel count and length. Every rendition of a set ends with the
 * same short fade, the take that sets the length included: if only the cut ones faded, the
 * one that ends as recorded could be told from the others by its last few milliseconds.
 */

/** Long enough that the end never clicks, short enough to be heard as the note's own end. */
export const END_FADE_SECONDS = 0.03

/**
 * The channels a rendition of `count` channels plays. Mono is duplicated into every channel;
 * a take that already has `count` comes back as it is. Any other layout is one the design
 * review refuses (see setFormatProblems); its channels are repeated in turn so that something
 * playable is still written.
 */
export function fitChannels(channels: readonly Float32Array[], count: number): Float32Array[] {
  if (channels.length === count) return [...channels]
  return Array.from({ length: count }, (_, c) => channels[c % channels.length])
}

/**
 * Exactly `frames` frames: cut after `frames`, or padded with silence when a take is short by
 * the frame or two that resampling can round away. The last `fadeSeconds` get a raised-cosine
 * fade-out. New arrays: the input is never changed, since a mono take stands for several
 * channels.
 */
export function fitLength(
  channels: readonly Float32Array[],
  frames: number,
  sampleRate: number,
  fadeSeconds = END_FADE_SECONDS,
): Float32Array[] {
  const fade = Math.min(frames, Math.round(fadeSeconds * sampleRate))
  return channels.map((channel) => {
    const out = new Float32Array(frames)
    out.set(channel.length > frames ? channel.subarray(0, frames) : channel)
    // Gain runs from just under 1 to 0 at the last frame: 0.5 + 0.5·cos(π·k/fade), k = 1…fade.
    for (let k = 1; k <= fade; k++) {
      out[frames - fade + k - 1] *= 0.5 + 0.5 * Math.cos((Math.PI * k) / fade)
    }
    return out
  })
}

/**
 * `fitLength` for channels nobody else holds: a take long enough is cut to a view of itself and
 * faded where it lies, so bringing a long take to its set costs no second copy. A channel that
 * stands for several (duplicated mono) is faded once and shared; only a take short by a frame or
 * two gets a new, padded array. The numbers are those `fitLength` gives.
 */
export function fitLengthInPlace(
  channels: readonly Float32Array[],
  frames: number,
  sampleRate: number,
  fadeSeconds = END_FADE_SECONDS,
): Float32Array[] {
  const fade = Math.min(frames, Math.round(fadeSeconds * sampleRate))
  const fitted = new Map<Float32Array, Float32Array>()
  return channels.map((channel) => {
    const known = fitted.get(channel)
    if (known) return known
    let out: Float32Array
    if (channel.length >= frames) out = channel.subarray(0, frames)
    else {
      out = new Float32Array(frames)
      out.set(channel)
    }
    for (let k = 1; k <= fade; k++) {
      out[frames - fade + k - 1] *= 0.5 + 0.5 * Math.cos((Math.PI * k) / fade)
    }
    fitted.set(channel, out)
    return out
  })
}
