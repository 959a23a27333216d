import { decodeWav } from './decodeWav.ts'
import { fitChannels, fitLength } from './fitLength.ts'
import { samplePeakDbfs } from './level.ts'
import { LEVEL_AIM_LU, matchSetLevels, type SetLevelInput } from './levelMatch.ts'
import { integratedLoudness, loudnessBlocks } from './loudness.ts'
import { DEFAULT_CEILING_DBFS, DEFAULT_TARGET_LUFS } from './rendition.ts'
import { resampleChannels } from './resample.ts'
import { chooseSetFormat, type SetFormat } from './setFormat.ts'
import type { DecodedAudio } from './types.ts'
import { writeRenditionWav } from './wavWriter.ts'

/*
 * The renditions of a matched set, in three steps: each take brought to the set's format
 * (prepareRendition), the set's gains found on what will be written (matchSetLevels), then each
 * file written and measured back (writeMatchedRendition).
 */

// Source beyond the cut that resampling still reads, so the filters see real signal up to it.
const RESAMPLE_MARGIN_SECONDS = 0.05

type Audio = Pick<DecodedAudio, 'channels' | 'sampleRate'>

/** A take in its set's format, before gain: resampled, in the set's channels, cut and faded. */
export function prepareRendition(audio: Audio, format: SetFormat): Float32Array[] {
  const { sampleRate } = audio
  // Resampling the part the cut will throw away would only cost time.
  const keep = Math.ceil(
    ((format.frames + RESAMPLE_MARGIN_SECONDS * format.sampleRate) * sampleRate) /
      format.sampleRate,
  )
  const source = audio.channels.map((c) => (c.length > keep ? c.subarray(0, keep) : c))
  const resampled = resampleChannels(source, sampleRate, format.sampleRate)
  return fitLength(fitChannels(resampled, format.channels), format.frames, format.sampleRate)
}

/** What the set's level matching needs of a prepared take. */
export function levelInput(channels: readonly Float32Array[], sampleRate: number): SetLevelInput {
  return { blocks: loudnessBlocks(channels, sampleRate), peakDbfs: samplePeakDbfs(channels) }
}

export interface WrittenRendition {
  bytes: Uint8Array
  gainDb: number
  /** Integrated loudness of the written file, decoded again. */
  loudnessLufs: number
  peakDbfs: number
}

/**
 * Writes a prepared take at its gain and measures the file itself. Rounding to 16 or 24 bits
 * moves the reading by far less than the tolerance, but the check is made on what players get:
 * a miss is corrected and the file written again (at most twice), never past the ceiling.
 */
export function writeMatchedRendition(
  channels: readonly Float32Array[],
  format: SetFormat,
  gainDb: number,
  targetLufs: number,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): WrittenRendition {
  let gain = gainDb
  for (let attempt = 0; ; attempt++) {
    const bytes = writeRenditionWav(channels, format.sampleRate, {
      bitDepth: format.bitDepth,
      gainDb: gain,
    })
    const back = decodeWav(bytes).channels
    const loudnessLufs = integratedLoudness(back, format.sampleRate)
    const peakDbfs = samplePeakDbfs(back)
    const miss = targetLufs - loudnessLufs
    if (Math.abs(miss) <= LEVEL_AIM_LU || attempt === 2)
      return { bytes, gainDb: gain, loudnessLufs, peakDbfs }
    gain = Math.min(gain + miss, ceilingDbfs - (peakDbfs - gain))
  }
}

export interface MatchedSetRenditions {
  format: SetFormat
  targetLufs: number
  renditions: WrittenRendition[]
}

/** Every rendition of a set of decoded takes at once (the clip code spreads these steps out). */
export function renderMatchedSet(
  takes: readonly DecodedAudio[],
  targetLufs = DEFAULT_TARGET_LUFS,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): MatchedSetRenditions {
  const format = chooseSetFormat(
    takes.map((t) => ({
      sampleRate: t.sampleRate,
      channels: t.channels.length,
      bitDepth: t.bitDepth,
      frames: t.channels[0]?.length ?? 0,
    })),
  )
  const prepared = takes.map((t) => prepareRendition(t, format))
  const levels = matchSetLevels(
    prepared.map((p) => levelInput(p, format.sampleRate)),
    targetLufs,
    ceilingDbfs,
  )
  return {
    format,
    targetLufs: levels.targetLufs,
    renditions: prepared.map((p, i) =>
      writeMatchedRendition(p, format, levels.gainsDb[i], levels.targetLufs, ceilingDbfs),
    ),
  }
}
