/*
 * The members of matched sets as the rendition code sees them: which clips form a set, what
 * each original is, and what its stored rendition is (the facts kept beside it).
 */
import type { Knex } from 'knex'
import type { SetFormat, SourceFormat } from '../audio/index.ts'

/** Clips of one excerpt by one performer on one instrument: only the string differs. */
export interface SetKey {
  excerptId: number
  performerCode: string
  instrumentCode: string
}

export const setKeyId = (k: SetKey) => `${k.excerptId}|${k.performerCode}|${k.instrumentCode}`

/** What a stored rendition is, as the clip row keeps it. */
export interface RenditionFacts {
  format: SetFormat
  loudnessLufs: number
}

export interface SetMember {
  key: SetKey
  /** Null for a clip not stored yet. */
  clipId: number | null
  /** The original, as decoded when it was measured. */
  source: SourceFormat
  originalFile: string
  /** Null until the first rendition is written. */
  renditionFile: string | null
  gainDb: number | null
  /** Null for renditions written before their facts were kept. */
  rendition: RenditionFacts | null
}

/** The columns a set member is read from (a clips row). */
export interface MemberRow {
  id: number
  original_file: string
  rendition_file: string
  rendition_gain_db: number
  sample_rate: number
  channels: number
  bit_depth: number
  duration_s: number
  rendition_sample_rate: number | null
  rendition_channels: number | null
  rendition_bit_depth: number | null
  rendition_duration_s: number | null
  rendition_loudness_lufs: number | null
}

/** The stored rendition's facts, or null when it was written before they were kept. */
export function renditionOfRow(r: MemberRow): RenditionFacts | null {
  if (
    r.rendition_sample_rate === null ||
    r.rendition_channels === null ||
    r.rendition_bit_depth === null ||
    r.rendition_duration_s === null ||
    r.rendition_loudness_lufs === null
  )
    return null
  return {
    format: {
      sampleRate: r.rendition_sample_rate,
      channels: r.rendition_channels,
      bitDepth: r.rendition_bit_depth === 24 ? 24 : 16,
      frames: Math.round(r.rendition_duration_s * r.rendition_sample_rate),
    },
    loudnessLufs: r.rendition_loudness_lufs,
  }
}

export const memberOfRow = (key: SetKey, r: MemberRow): SetMember => ({
  key,
  clipId: r.id,
  source: sourceOfRow(r),
  originalFile: r.original_file,
  renditionFile: r.rendition_file,
  gainDb: r.rendition_gain_db,
  rendition: renditionOfRow(r),
})

/** An original's format from its row; duration_s is frames / rate, so this is exact. */
export const sourceOfRow = (r: {
  sample_rate: number
  channels: number
  bit_depth: number
  duration_s: number
}): SourceFormat => ({
  sampleRate: r.sample_rate,
  channels: r.channels,
  bitDepth: r.bit_depth,
  frames: Math.round(r.duration_s * r.sample_rate),
})

/** A rendition's facts as clip columns. */
export const renditionColumns = (f: RenditionFacts) => ({
  rendition_sample_rate: f.format.sampleRate,
  rendition_channels: f.format.channels,
  rendition_bit_depth: f.format.bitDepth,
  rendition_duration_s: f.format.frames / f.format.sampleRate,
  rendition_loudness_lufs: f.loudnessLufs,
})

export async function loadSetMembers(
  db: Knex,
  keys: readonly SetKey[],
  excludeIds: readonly number[] = [],
): Promise<SetMember[]> {
  const unique = new Map(keys.map((k) => [setKeyId(k), k]))
  const members: SetMember[] = []
  for (const key of unique.values()) {
    const rows: MemberRow[] = await db('clips')
      .where({
        excerpt_id: key.excerptId,
        performer_code: key.performerCode,
        instrument_code: key.instrumentCode,
      })
      .whereNotIn('id', excludeIds)
      .orderBy('id')
    for (const r of rows) members.push(memberOfRow(key, r))
  }
  return members
}
