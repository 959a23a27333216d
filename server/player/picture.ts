// The one waveform a player screen draws. A picture per code would let a player tell codes apart
// by eye, and spot a hidden repeat as the twin of its first showing; so every screen of a
// matched set draws the same picture: the envelope of all the set's clips together, at their
// rendition gains, over the set's common length. It says what the passage looks like, not
// which recording is playing.

/** Waveforms are drawn on a phone at most this many columns wide; more is only bytes. */
export const PEAK_BUCKETS = 600

export interface Peaks {
  min: number[]
  max: number[]
}

export interface PictureSource {
  peaks: Peaks
  /** Seconds the peaks span. */
  duration: number
  gainDb: number
}

export interface ScreenPicture extends Peaks {
  duration: number
}

// Three decimals are finer than a phone's pixels and keep the plan small.
const round = (v: number) => Math.round(v * 1000) / 1000

/**
 * The envelope of every source over the first `duration` seconds (the shortest source's length
 * when not given): per column the lowest minimum and highest maximum of any source there.
 */
export function setPicture(
  sources: readonly PictureSource[],
  duration = Math.min(...sources.map((s) => s.duration)),
  buckets = PEAK_BUCKETS,
): ScreenPicture | null {
  const usable = sources.filter(
    (s) => s.duration > 0 && Math.min(s.peaks.min.length, s.peaks.max.length) > 0,
  )
  if (usable.length === 0 || !(duration > 0)) return null
  const min = new Array<number>(buckets).fill(0)
  const max = new Array<number>(buckets).fill(0)
  for (const s of usable) {
    const gain = 10 ** (s.gainDb / 20)
    const n = Math.min(s.peaks.min.length, s.peaks.max.length)
    const perSecond = n / s.duration
    for (let b = 0; b < buckets; b++) {
      const from = Math.floor(((b * duration) / buckets) * perSecond)
      const to = Math.max(from + 1, Math.floor((((b + 1) * duration) / buckets) * perSecond))
      for (let i = from; i < Math.min(to, n); i++) {
        min[b] = Math.min(min[b], s.peaks.min[i] * gain)
        max[b] = Math.max(max[b], s.peaks.max[i] * gain)
      }
    }
  }
  return { duration: round(duration), min: min.map(round), max: max.map(round) }
}
