/*
 * The one format every rendition of a matched set is written in. Clips of a set are compared
 * with each other, so anything that differs between their files (sample rate, channel count,
 * bit depth, length) would tell a listener with a file browser which recording is which, or let
 * a trial's odd sample end before its twins.
 */

/** What a recording is, as decoded: frames are samples per channel. */
export interface SourceFormat {
  sampleRate: number
  channels: number
  bitDepth: number
  frames: number
}

export interface SetFormat {
  sampleRate: number
  channels: number
  bitDepth: 16 | 24
  /** Length of every rendition, in frames at `sampleRate`. */
  frames: number
}

/**
 * Renditions never go above this rate: 48 kHz carries everything up to 24 kHz, beyond hearing
 * and beyond what a listening test on headphones can use, and it is the rate most playback
 * devices run at; a 96 kHz rendition would only double what every player downloads.
 */
export const MAX_RENDITION_RATE = 48_000

/** A source's length in frames at another rate (floor: never longer than the source holds). */
export function framesAt(source: Pick<SourceFormat, 'sampleRate' | 'frames'>, rate: number) {
  if (source.sampleRate === rate) return source.frames
  return Math.floor((source.frames * rate) / source.sampleRate + 1e-9)
}

/**
 * The set's format:
 * - the highest sample rate of the set, capped at 48 kHz, so no take loses bandwidth it had
 *   below 24 kHz, and a set recorded at one rate is never resampled at all;
 * - the most channels of the set: a mono take is duplicated, which sounds the same as mono on
 *   headphones, while folding a stereo take to mono would change how it sounds;
 * - 24-bit if any take is deeper than 16 bits (the quiet tail of a ring-out would lose detail
 *   at 16), else 16, since 16-bit takes gain nothing from more;
 * - the length of the shortest take, so no rendition ends in silence the others do not have,
 *   which would give the short one away and leave a gap when players switch near the end.
 */
export function chooseSetFormat(sources: readonly SourceFormat[]): SetFormat {
  if (sources.length === 0) throw new Error('A matched set has at least one clip')
  const sampleRate = Math.min(MAX_RENDITION_RATE, Math.max(...sources.map((s) => s.sampleRate)))
  return {
    sampleRate,
    channels: Math.max(...sources.map((s) => s.channels)),
    bitDepth: sources.some((s) => s.bitDepth > 16) ? 24 : 16,
    frames: Math.min(...sources.map((s) => framesAt(s, sampleRate))),
  }
}

export type SetFormatProblem =
  | { kind: 'too_short'; index: number; seconds: number }
  | { kind: 'channels'; index: number; channels: number }

/**
 * Why a set's takes cannot be brought to its format: a set shorter than `minSeconds` (the
 * index is its shortest take), or a take with several channels but fewer than the set (two
 * channels cannot stand for four; only mono is duplicated).
 */
export function setFormatProblems(
  sources: readonly SourceFormat[],
  format: SetFormat,
  minSeconds: number,
): SetFormatProblem[] {
  const problems: SetFormatProblem[] = []
  const seconds = format.frames / format.sampleRate
  if (seconds < minSeconds) {
    const lengths = sources.map((s) => framesAt(s, format.sampleRate))
    problems.push({ kind: 'too_short', index: lengths.indexOf(format.frames), seconds })
  }
  sources.forEach((s, index) => {
    if (s.channels > 1 && s.channels < format.channels)
      problems.push({ kind: 'channels', index, channels: s.channels })
  })
  return problems
}

export const sameSetFormat = (a: SetFormat, b: SetFormat) =>
  a.sampleRate === b.sampleRate &&
  a.channels === b.channels &&
  a.bitDepth === b.bitDepth &&
  a.frames === b.frames
