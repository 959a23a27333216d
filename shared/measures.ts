import type { ClipKind } from './schemas/clips'

// The objective measures stored for every clip, in one list: the clip columns, the clip
// pages, the findings' objective-vs-perceived correlations and their export all read it.
// A new measure is one entry here, its value in server/clips/measureValues.ts (the compiler
// asks for it) and a migration adding its column.

export interface MeasureSpec {
  /** Field name in API responses (`Clip`). */
  key: string
  /** Column of the clips table. */
  column: string
  /** Name in findings and exports. */
  name: string
  /** Label on the clip pages. */
  label: string
  unit: string
  /** How the client writes a value: see src/components/clipFormat.ts. */
  display: 'lufs' | 'hz' | 'seconds' | 'ms' | 'lossFactor'
  /** Recordings of these kinds have the measure; the others leave it empty. */
  kinds: readonly ClipKind[]
  /** Whether findings correlate it with what players perceived. */
  correlate: boolean
}

export const CLIP_MEASURES = [
  {
    key: 'loudnessLufs',
    column: 'loudness_lufs',
    name: 'loudness',
    label: 'Loudness',
    unit: 'LUFS',
    display: 'lufs',
    kinds: ['bowed', 'plucked'],
    correlate: true,
  },
  {
    key: 'centroidHz',
    column: 'centroid_hz',
    name: 'centroid',
    label: 'Spectral centroid',
    unit: 'Hz',
    display: 'hz',
    kinds: ['bowed', 'plucked'],
    correlate: true,
  },
  {
    key: 'f0Hz',
    column: 'f0_hz',
    name: 'f0',
    label: 'Fundamental (f0)',
    unit: 'Hz',
    display: 'hz',
    kinds: ['bowed', 'plucked'],
    correlate: false,
  },
  {
    key: 't60S',
    column: 't60_s',
    name: 'T60',
    label: 'Decay (T60)',
    unit: 's',
    display: 'seconds',
    kinds: ['plucked'],
    correlate: true,
  },
  {
    key: 'lossFactor',
    column: 'loss_factor',
    name: 'loss factor',
    label: 'Loss factor η',
    unit: '',
    display: 'lossFactor',
    kinds: ['plucked'],
    correlate: false,
  },
  {
    key: 'attackS',
    column: 'attack_s',
    name: 'attack time',
    label: 'Attack time',
    unit: 's',
    display: 'ms',
    kinds: ['bowed'],
    correlate: true,
  },
] as const satisfies readonly MeasureSpec[]

export type MeasureEntry = (typeof CLIP_MEASURES)[number]
export type ClipMeasureKey = MeasureEntry['key']
export type ClipMeasureColumn = MeasureEntry['column']
/** The measures findings correlate with perception. */
export type CorrelatedMeasureName = Extract<MeasureEntry, { correlate: true }>['name']

/** A clip's measures by API field: null where the recording's kind has none. */
export type ClipMeasureValues = { [K in ClipMeasureKey]: number | null }
