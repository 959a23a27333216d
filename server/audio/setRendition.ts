import { fitChannels, fitLength, fitLengthInPlace } from './fitLength.ts'
import { kWeighting } from './kWeighting.ts'
import { dbToGain, gainToDb, samplePeakDbfs } from './level.ts'
import { LEVEL_AIM_LU, matchSetLevels, type SetLevelInput } from './levelMatch.ts'
import {
  blocksOfSteps,
  gatedLoudness,
  KWeightedSteps,
  loudnessBlocks,
  loudnessStep,
} from './loudness.ts'
import { DEFAULT_CEILING_DBFS, DEFAULT_TARGET_LUFS } from './rendition.ts'
import { resampleChannels } from './resample.ts'
import { chooseSetFormat, type SetFormat } from './setFormat.ts'
import type { DecodedAudio } from './types.ts'
import { pcmInteger } from './wavEncoder.ts'
import { writeRenditionWav } from './wavWriter.ts'

/*
 * The renditions of a matched set, in three steps: each take brought to the set's format
 * (prepareRendition), the set's gains found on what will be written (matchSetLevels), then each
 * take's gain checked on the samples the file will hold (matchRenditionLevel) and the file
 * written (writeMatchedRendition in memory, writeRenditionWavFile to disk).
 */

// Source beyond the cut that resampling still reads, so the filters see real signal up to it.
const RESAMPLE_MARGIN_SECONDS = 0.05

type Audio = Pick<DecodedAudio, 'channels' | 'sampleRate'>

/**
 * A take in its set's format, before gain: resampled, in the set's channels, cut and faded. With
 * `owned` (the caller decoded the take for this alone) its samples are cut and faded where they
 * lie instead of copied; resampled samples are always new, and treated so either way.
 */
export function prepareRendition(audio: Audio, format: SetFormat, owned = false): Float32Array[] {
  const { sampleRate } = audio
  // Resampling the part the cut will throw away would only cost time.
  const keep = Math.ceil(
    ((format.frames + RESAMPLE_MARGIN_SECONDS * format.sampleRate) * sampleRate) /
      format.sampleRate,
  )
  const source = audio.channels.map((c) => (c.length > keep ? c.subarray(0, keep) : c))
  const resampled = resampleChannels(source, sampleRate, format.sampleRate)
  const fit = owned || sampleRate !== format.sampleRate ? fitLengthInPlace : fitLength
  return fit(fitChannels(resampled, format.channels), format.frames, format.sampleRate)
}

/** What the set's level matching needs of a prepared take. */
export function levelInput(channels: readonly Float32Array[], sampleRate: number): SetLevelInput {
  return { blocks: loudnessBlocks(channels, sampleRate), peakDbfs: samplePeakDbfs(channels) }
}

// Samples turned into what the file will hold, and measured, at a time.
const LEVEL_BLOCK = 64 * 1024

export interface RenditionLevel {
  gainDb: number
  /** Integrated loudness of the samples as the file holds them. */
  loudnessLufs: number
  peakDbfs: number
}

/**
 * Loudness and sample peak of a prepared take as a WAV at `bitDepth` and `gainDb` would hold it,
 * read back: each sample rounded and clipped as the writer does, then divided by full scale as
 * the reader does. Block by block, so neither the file nor its decoded copy is ever made.
 */
export function renditionLevel(
  channels: readonly Float32Array[],
  sampleRate: number,
  bitDepth: 16 | 24,
  gainDb: number,
): Omit<RenditionLevel, 'gainDb'> {
  const frames = channels[0]?.length ?? 0
  const full = 2 ** (bitDepth - 1)
  const gain = dbToGain(gainDb)
  const filter = kWeighting(sampleRate)
  const step = loudnessStep(sampleRate)
  const part = new Float32Array(Math.min(frames, LEVEL_BLOCK))
  let peak = 0
  const energies = channels.map((channel) => {
    const steps = new KWeightedSteps(filter, step, frames)
    for (let from = 0; from < frames; from += LEVEL_BLOCK) {
      const to = Math.min(frames, from + LEVEL_BLOCK)
      const block = part.subarray(0, to - from)
      for (let i = from; i < to; i++) {
        const v = i < channel.length ? pcmInteger(channel[i] * gain, full) / full : 0
        block[i - from] = v
        const magnitude = v < 0 ? -v : v
        if (magnitude > peak) peak = magnitude
      }
      steps.push(block)
    }
    return steps.energy
  })
  return { loudnessLufs: gatedLoudness(blocksOfSteps(energies, step)), peakDbfs: gainToDb(peak) }
}

/**
 * The gain to write a prepared take at, checked on what players get. Rounding to 16 or 24 bits
 * moves the reading by far less than the tolerance, but a miss is corrected and the take
 * measured again (at most twice), never past the ceiling.
 */
export function matchRenditionLevel(
  channels: readonly Float32Array[],
  format: SetFormat,
  gainDb: number,
  targetLufs: number,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): RenditionLevel {
  let gain = gainDb
  for (let attempt = 0; ; attempt++) {
    const { loudnessLufs, peakDbfs } = renditionLevel(
      channels,
      format.sampleRate,
      format.bitDepth,
      gain,
    )
    const miss = targetLufs - loudnessLufs
    if (Math.abs(miss) <= LEVEL_AIM_LU || attempt === 2)
      return { gainDb: gain, loudnessLufs, peakDbfs }
    gain = Math.min(gain + miss, ceilingDbfs - (peakDbfs - gain))
  }
}

export interface WrittenRendition extends RenditionLevel {
  bytes: Uint8Array
}

/**
 * Writes a prepared take at its gain (see matchRenditionLevel) into bytes in memory; the clip
 * code writes the same bytes straight to a file with writeRenditionWavFile.
 */
export function writeMatchedRendition(
  channels: readonly Float32Array[],
  format: SetFormat,
  gainDb: number,
  targetLufs: number,
  ceilingDbfs = DEFAULT_CEILING_DBFS,
): WrittenRendition {
  const level = matchRenditionLevel(channels, format, gainDb, targetLufs, ceilingDbfs)
  const bytes = writeRenditionWav(channels, format.sampleRate, {
    bitDepth: format.bitDepth,
    gainDb: level.gainDb,
  })
  return { bytes, ...level }
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
