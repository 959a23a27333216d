import { analyseClip, isAudioError, type ClipAnalysis } from '../audio/index.ts'
import type { ClipKind } from '../../shared/schemas/clips'
import type { StoredContainer } from './storage'

export interface Measured {
  analysis: ClipAnalysis
  container: StoredContainer
  loudnessLufs: number
}

/** A refusal of the recording itself, in words for the person who sent it. */
export class RecordingRefused extends Error {}

/**
 * Decodes and measures an upload. Anything the audio code refuses (not audio, empty, truncated,
 * corrupt, too long, silent) comes back as RecordingRefused with the decoder's own sentence.
 */
export async function measureRecording(bytes: Uint8Array, kind: ClipKind): Promise<Measured> {
  let analysis: ClipAnalysis
  try {
    analysis = await analyseClip(bytes, { kind })
  } catch (err) {
    if (isAudioError(err)) throw new RecordingRefused(err.message)
    throw err
  }
  // Level matching needs a loudness, and BS.1770 needs at least one 400 ms block above the gate.
  if (analysis.loudnessLufs === null) {
    throw new RecordingRefused(
      'The recording is too short or too quiet to measure its loudness (at least 0.4 s of sound).',
    )
  }
  // RF64 holds the same samples as WAV; the original keeps its bytes, so only the name differs.
  const container: StoredContainer = analysis.container === 'flac' ? 'flac' : 'wav'
  return { analysis, container, loudnessLufs: analysis.loudnessLufs }
}

/** The measures as stored columns. */
export function measureColumns(m: Measured) {
  const a = m.analysis
  return {
    container: a.container,
    duration_s: a.durationSeconds,
    sample_rate: a.sampleRate,
    channels: a.channels,
    bit_depth: a.bitDepth,
    peak_dbfs: a.peakDbfs,
    loudness_lufs: m.loudnessLufs,
    centroid_hz: a.centroidHz,
    f0_hz: a.f0Hz,
    t60_s: a.decay?.t60Seconds ?? null,
    loss_factor: a.decay?.lossFactor ?? null,
    attack_s: a.attack?.attackSeconds ?? null,
    peaks: JSON.stringify(a.peaks),
  }
}
