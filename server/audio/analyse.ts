import { attackTime, type AttackResult } from './attack.ts'
import { spectralCentroid } from './centroid.ts'
import { decayTime, lossFactor, qualityFactor, type DecayResult } from './decay.ts'
import { decodeAudio, decodeAudioFile } from './decode.ts'
import { AudioError } from './errors.ts'
import { integratedLoudness } from './loudness.ts'
import { mixToMono, mixToMonoInPlace, samplePeakDbfs } from './level.ts'
import { waveformPeaks, type WaveformPeaks } from './peaks.ts'
import { estimateF0 } from './pitch.ts'
import type { DecodedAudio } from './types.ts'

export type ClipKind = 'bowed' | 'plucked'

export interface AnalyseOptions {
  kind: ClipKind
  /** Longer recordings are refused; the default allows ten minutes. */
  maxSeconds?: number
  /** Waveform buckets for drawing. */
  peakBuckets?: number
}

export const DEFAULT_MAX_SECONDS = 600
/** A clip whose loudest sample stays below this holds nothing to listen to. */
export const SILENCE_DBFS = -60

export interface ClipDecay extends DecayResult {
  /** Centre of the band measured (the fundamental). */
  frequencyHz: number
  lossFactor: number
  qualityFactor: number
}

/** Everything measured about one upload, as plain JSON-safe data (null where not measurable). */
export interface ClipAnalysis {
  container: DecodedAudio['container']
  format: DecodedAudio['format']
  durationSeconds: number
  sampleRate: number
  channels: number
  bitDepth: number
  peakDbfs: number
  /** Null for clips shorter than one 400 ms loudness block. */
  loudnessLufs: number | null
  centroidHz: number | null
  f0Hz: number | null
  /** Plucked clips only. */
  decay: ClipDecay | null
  /** Bowed clips only. */
  attack: AttackResult | null
  peaks: WaveformPeaks
}

/** Sniff, decode and measure one uploaded clip. Throws AudioError for anything refused. */
export async function analyseClip(
  bytes: Uint8Array,
  options: AnalyseOptions,
): Promise<ClipAnalysis> {
  const maxSeconds = options.maxSeconds ?? DEFAULT_MAX_SECONDS
  const audio = await decodeAudio(bytes, { maxSeconds })
  return measure(audio, options, true)
}

/**
 * The same as `analyseClip` for a file on disk, read in blocks: only the decoded channels are
 * ever held, and the mono mix is made in the first of them rather than beside them.
 */
export async function analyseClipFile(
  path: string,
  options: AnalyseOptions,
): Promise<ClipAnalysis> {
  const maxSeconds = options.maxSeconds ?? DEFAULT_MAX_SECONDS
  const audio = await decodeAudioFile(path, { maxSeconds })
  return measure(audio, options, true)
}

/** The measures on audio already decoded (for example a rendition built from the original). */
export function analyseDecoded(audio: DecodedAudio, options: AnalyseOptions): ClipAnalysis {
  return measure(audio, options, false)
}

/**
 * The measures. The ones that need every channel (peak, loudness, waveform) come first; the rest
 * describe the sound and use the channels' average. When the caller owns the decoded samples
 * (`owned`), that average is written over the first channel and the others let go, so a stereo
 * clip never holds a third copy of its length; otherwise it is a new array and the input is left
 * as it came.
 */
function measure(audio: DecodedAudio, options: AnalyseOptions, owned: boolean): ClipAnalysis {
  const { sampleRate, channels } = audio
  const channelCount = channels.length
  const frames = channels[0]?.length ?? 0
  if (frames === 0) throw new AudioError('empty', 'The recording holds no samples.')
  const peakDbfs = samplePeakDbfs(channels)
  if (peakDbfs < SILENCE_DBFS) {
    throw new AudioError('silent', 'The recording is silent.')
  }
  const loudness = integratedLoudness(channels, sampleRate)
  const peaks = waveformPeaks(channels, options.peakBuckets)
  const mono = owned ? mixToMonoInPlace(channels) : mixToMono(channels)
  if (owned) audio.channels = [mono]
  const pitch = estimateF0(mono, sampleRate)
  const f0Hz = pitch?.f0Hz ?? null

  let decay: ClipDecay | null = null
  if (options.kind === 'plucked') {
    // A band of a whole tone less than an octave around f0 keeps the faster upper partials out.
    const band = f0Hz === null ? undefined : ([f0Hz / 1.26, f0Hz * 1.26] as const)
    const result = decayTime(mono, sampleRate, { band })
    if (result && f0Hz !== null) {
      decay = {
        ...result,
        frequencyHz: f0Hz,
        lossFactor: lossFactor(f0Hz, result.t60Seconds),
        qualityFactor: qualityFactor(f0Hz, result.t60Seconds),
      }
    }
  }

  return {
    container: audio.container,
    format: audio.format,
    durationSeconds: frames / sampleRate,
    sampleRate,
    channels: channelCount,
    bitDepth: audio.bitDepth,
    peakDbfs,
    loudnessLufs: Number.isFinite(loudness) ? loudness : null,
    centroidHz: spectralCentroid(mono, sampleRate),
    f0Hz,
    decay,
    attack: options.kind === 'bowed' ? attackTime(mono, sampleRate) : null,
    peaks,
  }
}
