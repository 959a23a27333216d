import { analyseClip, analyseClipFile, isAudioError, type ClipAnalysis } from '../audio/index.ts'
import { CLIP_LIMITS, type ClipKind } from '../../shared/schemas/clips'
import type { StoredContainer } from './storage'
import { CLIP_MEASURES, type ClipMeasureKey } from '../../shared/measures'
import type { WorkerPool } from '../workers/pool'
import { valueOf } from '../workers/outcome'

export interface Measured {
  analysis: ClipAnalysis
  container: StoredContainer
  loudnessLufs: number
}

/**
 * Measures the recording in a file on disk, in the worker pool when one is given: decoding and
 * measuring a long take costs seconds, which the event loop must not spend.
 */
export async function measureFile(
  path: string,
  kind: ClipKind,
  pool: WorkerPool | undefined,
): Promise<Measured> {
  if (pool) return valueOf(await pool.run('measureClip', path, kind))
  return measureRecording(path, kind)
}

/** A refusal of the recording itself, in words for the person who sent it. */
export class RecordingRefused extends Error {}

/**
 * Decodes and measures a recording: its bytes, or (better for anything long) the path of its
 * file, which is then read in blocks rather than held whole. Anything the audio code refuses
 * (not audio, empty, truncated, corrupt, too long, silent) comes back as RecordingRefused with
 * the decoder's own sentence.
 */
export async function measureRecording(
  recording: Uint8Array | string,
  kind: ClipKind,
): Promise<Measured> {
  let analysis: ClipAnalysis
  try {
    analysis =
      typeof recording === 'string'
        ? await analyseClipFile(recording, { kind })
        : await analyseClip(recording, { kind })
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
  // Every rendition of a set is cut to its shortest take, so a take too short to compare would
  // cut all the others down with it.
  if (analysis.durationSeconds < CLIP_LIMITS.minSeconds) {
    throw new RecordingRefused(
      `The recording lasts ${analysis.durationSeconds.toFixed(2)} s; a clip must last at least ${CLIP_LIMITS.minSeconds} s to be compared with others.`,
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
    ...Object.fromEntries(CLIP_MEASURES.map((spec) => [spec.column, MEASURE_VALUES[spec.key](m)])),
    peaks: JSON.stringify(a.peaks),
  }
}

/** Each listed measure's value from an analysis (see shared/measures.ts). */
const MEASURE_VALUES: { [K in ClipMeasureKey]: (m: Measured) => number | null } = {
  loudnessLufs: (m) => m.loudnessLufs,
  centroidHz: (m) => m.analysis.centroidHz,
  f0Hz: (m) => m.analysis.f0Hz,
  t60S: (m) => m.analysis.decay?.t60Seconds ?? null,
  lossFactor: (m) => m.analysis.decay?.lossFactor ?? null,
  attackS: (m) => m.analysis.attack?.attackSeconds ?? null,
}
