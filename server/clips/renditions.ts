/*
 * Writing the blind renditions of matched sets: every rendition of a set in one format, at one
 * loudness measured on the file itself.
 */
import {
  chooseSetFormat,
  decodeAudioFile,
  decodeWavFile,
  LEVEL_TOLERANCE_LU,
  levelInput,
  matchRenditionLevel,
  matchSetLevels,
  prepareRendition,
  sameSetFormat,
  writeRenditionWavFile,
  type SetFormat,
  type SetLevelInput,
} from '../audio/index.ts'
import { CLIP_LIMITS } from '../../shared/schemas/clips'
import {
  originalPath,
  removeMedia,
  renditionPath,
  writeRenditionFile,
  type MediaFolders,
} from './storage'
import { setKeyId, type RenditionFacts, type SetMember } from './setMembers'
import type { WorkerPool } from '../workers/pool'
import { valueOf } from '../workers/outcome'

export interface RenditionChange {
  member: SetMember
  gainDb: number
  file: string
  facts: RenditionFacts
}

/** A change as a worker thread reports it: the member by its place in the set it was given. */
export interface RenderedMember {
  index: number
  gainDb: number
  file: string
  facts: RenditionFacts
}

// Below this a new gain is inaudible and not worth a new file.
const GAIN_STEP_DB = 0.01
// Prepared takes kept between finding the gains and writing (Float32 samples, ~128 MB);
// beyond it a take is prepared again when written, so a set of long takes never fills memory.
const RETAIN_SAMPLES = 32 * 2 ** 20

const yieldToOthers = () => new Promise<void>((resolve) => setImmediate(resolve))

// The original is read from disk in blocks and its samples cut and faded where they lie: one
// copy of the take in memory, not the file, its samples and a fitted copy of them.
async function prepared(folders: MediaFolders, member: SetMember, format: SetFormat) {
  const audio = await decodeAudioFile(originalPath(folders, member.originalFile))
  return prepareRendition(audio, format, true)
}

/**
 * The level of a take read from its rendition, when that is already in the set's format: the
 * file is the prepared take times its gain, so taking the gain out again gives what preparing
 * the original would, without decoding and resampling it. A new take joining a set then costs
 * its set-mates one read of their renditions. Null when the original must be prepared.
 */
async function writtenLevel(
  folders: MediaFolders,
  member: SetMember,
  format: SetFormat,
): Promise<SetLevelInput | null> {
  const { renditionFile, gainDb, rendition } = member
  if (renditionFile === null || gainDb === null || rendition === null) return null
  if (!sameSetFormat(rendition.format, format)) return null
  try {
    const audio = await decodeWavFile(renditionPath(folders, renditionFile))
    const frames = audio.channels[0]?.length ?? 0
    if (audio.channels.length !== format.channels || frames !== format.frames) return null
    const level = levelInput(audio.channels, format.sampleRate)
    const power = 10 ** (gainDb / 10)
    return { blocks: level.blocks.map((b) => b / power), peakDbfs: level.peakDbfs - gainDb }
  } catch {
    return null
  }
}

/**
 * Brings every set the members belong to under the one-format rule (server/audio/setFormat.ts)
 * at one measured level, and writes a new rendition for every member that has none, or whose
 * format, gain or level moved. Files are only added here; the caller records them and removes
 * the replaced ones after its commit. If any rendering fails, the files already written are
 * removed before the error goes on. Each set is decoded, measured and written in the worker
 * pool when one is given, so a long take never holds up the requests of others.
 */
export async function renderChanges(
  folders: MediaFolders,
  members: readonly SetMember[],
  pool?: WorkerPool,
): Promise<RenditionChange[]> {
  const bySet = new Map<string, SetMember[]>()
  for (const m of members) bySet.set(setKeyId(m.key), [...(bySet.get(setKeyId(m.key)) ?? []), m])
  const changes: RenditionChange[] = []
  try {
    for (const set of bySet.values()) {
      const rendered = pool
        ? valueOf(await pool.run('renderSet', folders, set))
        : await renderSet(folders, set)
      // A thread hands back copies; the caller knows its members by identity.
      changes.push(...rendered.map(({ index, ...change }) => ({ member: set[index], ...change })))
    }
  } catch (err) {
    await discardChanges(folders, changes)
    throw err
  }
  return changes
}

/**
 * The renditions one set needs, written; runs in a worker thread (server/workers/clipTasks.ts).
 * If a write fails, the files this set already wrote are removed before the error goes on.
 */
export async function renderSet(
  folders: MediaFolders,
  set: readonly SetMember[],
): Promise<RenderedMember[]> {
  const format = chooseSetFormat(set.map((m) => m.source))
  const kept = new Map<SetMember, Float32Array[]>()
  let keptSamples = 0
  const inputs: SetLevelInput[] = []
  for (const member of set) {
    const written = await writtenLevel(folders, member, format)
    if (written) inputs.push(written)
    else {
      const channels = await prepared(folders, member, format)
      inputs.push(levelInput(channels, format.sampleRate))
      const size = format.frames * format.channels
      if (keptSamples + size <= RETAIN_SAMPLES) {
        kept.set(member, channels)
        keptSamples += size
      }
    }
    await yieldToOthers()
  }
  const levels = matchSetLevels(inputs, CLIP_LIMITS.targetLufs, CLIP_LIMITS.ceilingDbfs)

  const changes: RenderedMember[] = []
  try {
    for (const [i, member] of set.entries()) {
      const r = member.rendition
      const current =
        member.renditionFile !== null &&
        member.gainDb !== null &&
        r !== null &&
        sameSetFormat(r.format, format) &&
        Math.abs(member.gainDb - levels.gainsDb[i]) < GAIN_STEP_DB &&
        Math.abs(r.loudnessLufs - levels.targetLufs) <= LEVEL_TOLERANCE_LU
      if (current) continue
      const channels = kept.get(member) ?? (await prepared(folders, member, format))
      // The gain is checked on the samples as the file will hold them, then the file is written
      // block by block: it never exists whole in memory.
      const level = matchRenditionLevel(
        channels,
        format,
        levels.gainsDb[i],
        levels.targetLufs,
        CLIP_LIMITS.ceilingDbfs,
      )
      const file = await writeRenditionFile(folders, (path) =>
        writeRenditionWavFile(path, channels, format.sampleRate, {
          bitDepth: format.bitDepth,
          gainDb: level.gainDb,
        }),
      )
      changes.push({
        index: i,
        gainDb: level.gainDb,
        file,
        facts: { format, loudnessLufs: level.loudnessLufs },
      })
      await yieldToOthers()
    }
  } catch (err) {
    await removeMedia(changes.map((c) => renditionPath(folders, c.file)))
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
