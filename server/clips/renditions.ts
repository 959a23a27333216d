import type { Knex } from 'knex'
import { decodeAudio, matchedSetGains, writeRenditionWav } from '../audio/index.ts'
import { CLIP_LIMITS } from '../../shared/schemas/clips'
import {
  readOriginal,
  removeMedia,
  renditionPath,
  writeRenditionFile,
  type MediaFolders,
} from './storage'

/** Clips of one excerpt by one performer on one instrument: only the string differs. */
export interface SetKey {
  excerptId: number
  performerCode: string
  instrumentCode: string
}

export const setKeyId = (k: SetKey) => `${k.excerptId}|${k.performerCode}|${k.instrumentCode}`

export interface SetMember {
  key: SetKey
  /** Null for a clip not stored yet. */
  clipId: number | null
  loudnessLufs: number
  peakDbfs: number
  bitDepth: number
  originalFile: string
  /** Null until the first rendition is written. */
  renditionFile: string | null
  gainDb: number | null
}

export interface RenditionChange {
  member: SetMember
  gainDb: number
  file: string
}

// Below this a new gain is inaudible and not worth a new file.
const GAIN_STEP_DB = 0.01

interface MemberRow {
  id: number
  excerpt_id: number
  performer_code: string
  instrument_code: string
  loudness_lufs: number
  peak_dbfs: number
  bit_depth: number
  original_file: string
  rendition_file: string
  rendition_gain_db: number
}

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
    for (const r of rows) {
      members.push({
        key,
        clipId: r.id,
        loudnessLufs: r.loudness_lufs,
        peakDbfs: r.peak_dbfs,
        bitDepth: r.bit_depth,
        originalFile: r.original_file,
        renditionFile: r.rendition_file,
        gainDb: r.rendition_gain_db,
      })
    }
  }
  return members
}

/**
 * The gain of every member, set by set: each set is brought to the target together and lowered
 * together when one clip would otherwise peak above the ceiling.
 */
export function planGains(members: readonly SetMember[]): Map<SetMember, number> {
  const bySet = new Map<string, SetMember[]>()
  for (const m of members) {
    const id = setKeyId(m.key)
    bySet.set(id, [...(bySet.get(id) ?? []), m])
  }
  const gains = new Map<SetMember, number>()
  for (const set of bySet.values()) {
    const { gainsDb } = matchedSetGains(set, CLIP_LIMITS.targetLufs, CLIP_LIMITS.ceilingDbfs)
    set.forEach((m, i) => gains.set(m, gainsDb[i]))
  }
  return gains
}

/**
 * Writes a new rendition for every member that has none or whose gain moved. Files are only
 * added here; the caller records them and removes the replaced ones after its commit. If any
 * rendering fails, the files already written are removed before the error goes on.
 */
export async function renderChanges(
  folders: MediaFolders,
  gains: ReadonlyMap<SetMember, number>,
): Promise<RenditionChange[]> {
  const changes: RenditionChange[] = []
  try {
    for (const [member, gainDb] of gains) {
      const moved = member.gainDb === null || Math.abs(member.gainDb - gainDb) >= GAIN_STEP_DB
      if (member.renditionFile !== null && !moved) continue
      const audio = await decodeAudio(await readOriginal(folders, member.originalFile))
      const bytes = writeRenditionWav(audio.channels, audio.sampleRate, {
        bitDepth: member.bitDepth <= 16 ? 16 : 24,
        gainDb,
      })
      changes.push({ member, gainDb, file: await writeRenditionFile(folders, bytes) })
    }
  } catch (err) {
    await discardChanges(folders, changes)
    throw err
  }
  return changes
}

export async function discardChanges(
  folders: MediaFolders,
  changes: readonly RenditionChange[],
): Promise<void> {
  await removeMedia(changes.map((c) => renditionPath(folders, c.file)))
}

/** Renditions that the changes replaced, to delete once the new ones are committed. */
export function replacedFiles(folders: MediaFolders, changes: readonly RenditionChange[]) {
  return changes
    .map((c) => c.member.renditionFile)
    .filter((f): f is string => f !== null)
    .map((f) => renditionPath(folders, f))
}
