import { INSTRUMENTS, type Instrument } from '../../constants'
import type { ClipKind } from './vocabulary'

// Clips as the clip pages show them: measures, details and matched sets.

export interface ClipMeasures {
  container: 'wav' | 'rf64' | 'flac'
  durationS: number
  sampleRate: number
  channels: number
  bitDepth: number
  peakDbfs: number
  loudnessLufs: number
  centroidHz: number | null
  f0Hz: number | null
  /** Plucked ring-outs: decay time of the fundamental and its loss factor. */
  t60S: number | null
  lossFactor: number | null
  /** Bowed passages: onset to steady level of the first note. */
  attackS: number | null
}

export interface Clip extends ClipMeasures {
  id: number
  recipeId: number
  recipeName: string
  recipeVersion: number
  instrument: Instrument
  excerptId: number
  excerptName: string
  performerCode: string
  instrumentCode: string
  bowStroke: string
  stringPlayed: string
  stringsAgeDays: number | null
  recordedOn: string | null
  kind: ClipKind
  notes: string
  /** Moves on with every change of its fields or archiving; an edit sends the one it loaded. */
  revision: number
  /** Set when archived: hidden from lists and pickers, kept for the sessions that use it. */
  archivedAt: string | null
  originalName: string
  /** The gain the blind rendition carries, and the loudness it reaches. */
  renditionGainDb: number
  renditionLufs: number
  audioUrl: string
  createdBy: string | null
  createdAt: string
}

export interface ClipDetail extends Clip {
  peaks: { min: number[]; max: number[] }
}

export interface MatchedSet {
  excerptId: number
  excerptName: string
  performerCode: string
  instrumentCode: string
  /** Recipe id → clip ids of this set recorded on that recipe. */
  cells: Record<number, number[]>
  complete: boolean
  /** The loudness every rendition of the set is brought to. */
  targetLufs: number
}

/** Sets whose recipes are strings for the same instrument and string, side by side. */
export interface MatchedSetSection {
  instrument: (typeof INSTRUMENTS)[number]
  stringName: string
  recipes: { id: number; name: string; version: number }[]
  sets: MatchedSet[]
}

export interface ManifestResult {
  clips: Clip[]
}
