/*
 * The design review's look at the format of each chosen set: what each take was recorded as,
 * the one format every rendition of its matched set is written in (server/audio/setFormat.ts),
 * where cutting to the set's length throws away sound, and sets that cannot be brought to one
 * format at all.
 */
import type { Knex } from 'knex'
import {
  chooseSetFormat,
  framesAt,
  sameSetFormat,
  setFormatProblems,
  type SetFormat,
} from '../audio/index.ts'
import { renditionOfRow, setKeyId, sourceOfRow, type MemberRow } from '../clips/setMembers'
import { CLIP_LIMITS } from '../../shared/schemas/clips'
import type { SetFormatReport } from '../../shared/schemas/sessions'

/**
 * What counts as sound in the part a cut removes: a moment whose peak is within 27 dB of the
 * take's integrated loudness. Renditions play at −23 LUFS, so that is −50 dBFS in the rendition:
 * at a comfortable listening level still heard in a quiet room, while room tone and the
 * recorder's noise of a good take lie below it. A ring-out that still sounds is cut; a take
 * that has already died away is not.
 */
export const SOUND_BELOW_LOUDNESS_DB = 27
/** Cuts of less sound than this pass without a word: the end fade covers them. */
const WARN_CUT_SECONDS = 0.1

interface ReviewedClip {
  id: number
  recipeName: string
}
interface ReviewedSet {
  excerptName: string
  performerCode: string
  instrumentCode: string
  clips: ReviewedClip[]
  twins: ReviewedClip[]
}

interface TakeRow extends MemberRow {
  recipe_id: number
  excerpt_id: number
  performer_code: string
  instrument_code: string
  loudness_lufs: number
  peaks: string | null
}

const facts = (f: SetFormat) => ({
  sampleRate: f.sampleRate,
  channels: f.channels,
  bitDepth: f.bitDepth,
  durationS: f.frames / f.sampleRate,
})

/**
 * Seconds of sound between `fromS` and the end of a take, judged from its waveform peaks
 * (min/max per bucket over the whole take). Without peaks, all of it counts.
 */
export function soundAfter(
  take: Pick<TakeRow, 'duration_s' | 'loudness_lufs' | 'peaks'>,
  fromS: number,
): number {
  const durationS = take.duration_s
  let peaks: { min: number[]; max: number[] } | null
  try {
    peaks = take.peaks ? JSON.parse(take.peaks) : null
  } catch {
    peaks = null
  }
  const n = Math.min(peaks?.min.length ?? 0, peaks?.max.length ?? 0)
  if (!peaks || n === 0) return Math.max(0, durationS - fromS)
  const threshold = 10 ** ((take.loudness_lufs - SOUND_BELOW_LOUDNESS_DB) / 20)
  for (let b = n - 1; b >= 0; b--) {
    const end = ((b + 1) * durationS) / n
    if (end <= fromS) break
    if (Math.max(Math.abs(peaks.min[b]), Math.abs(peaks.max[b])) > threshold) return end - fromS
  }
  return 0
}

const label = (s: ReviewedSet) =>
  `Set '${s.excerptName} · ${s.performerCode} · ${s.instrumentCode}'`
const channelWord = (n: number) => (n === 1 ? 'mono' : n === 2 ? 'stereo' : `${n} channels`)

/**
 * Reviews the format of every set: errors go to the clipSets field, warnings to the list, and
 * the returned map holds each reviewable set's report (a set whose clips are missing or mixed
 * is left to the rest of the review).
 */
export async function reviewSetFormats<S extends ReviewedSet>(
  db: Knex,
  sets: readonly S[],
  fail: (field: string, message: string) => void,
  warnings: string[],
): Promise<Map<S, SetFormatReport>> {
  const reports = new Map<S, SetFormatReport>()
  const chosenIds = sets.flatMap((s) => [...s.clips, ...s.twins].map((c) => c.id))
  if (chosenIds.length === 0) return reports
  const chosenRows: TakeRow[] = await db('clips').whereIn('id', chosenIds)
  const keyOf = (r: TakeRow) =>
    setKeyId({
      excerptId: r.excerpt_id,
      performerCode: r.performer_code,
      instrumentCode: r.instrument_code,
    })
  const keys = new Map(chosenRows.map((r) => [keyOf(r), r]))
  // Every take of the matched sets: all of them decide the format, chosen or not.
  const takes: TakeRow[] = await db('clips')
    .where((q) => {
      for (const r of keys.values())
        q.orWhere({
          excerpt_id: r.excerpt_id,
          performer_code: r.performer_code,
          instrument_code: r.instrument_code,
        })
    })
    .orderBy('id')
  const recipeNames: { id: number; name: string; version: number }[] = await db('recipes')
    .whereIn('id', [...new Set(takes.map((t) => t.recipe_id))])
    .select('id', 'name', 'version')
  const recipeOf = new Map(
    recipeNames.map((r) => [r.id, r.version > 1 ? `${r.name} v${r.version}` : r.name]),
  )
  const byId = new Map(takes.map((t) => [t.id, t]))

  for (const set of sets) {
    const chosen = [...set.clips, ...set.twins].flatMap((c) => byId.get(c.id) ?? [])
    const setKeys = new Set(chosen.map(keyOf))
    if (chosen.length === 0 || setKeys.size !== 1) continue
    const members = takes.filter((t) => keyOf(t) === [...setKeys][0])
    const sources = members.map(sourceOfRow)
    const format = chooseSetFormat(sources)
    const name = (t: TakeRow) => `clip ${t.id} (${recipeOf.get(t.recipe_id) ?? 'unknown recipe'})`

    for (const problem of setFormatProblems(sources, format, CLIP_LIMITS.minSeconds)) {
      const take = members[problem.index]
      fail(
        'clipSets',
        problem.kind === 'too_short'
          ? `${label(set)} cannot be brought to one length: its shortest take, ${name(take)}, ` +
              `lasts ${problem.seconds.toFixed(2)} s, and every rendition of a set is cut to its ` +
              `shortest take; a set needs at least ${CLIP_LIMITS.minSeconds} s. Delete that take ` +
              'or record it again.'
          : `${label(set)} cannot be brought to one format: ${name(take)} is ` +
              `${channelWord(problem.channels)} and another take has ${format.channels} ` +
              'channels; only a mono take can be spread over more channels.',
      )
    }

    const setSeconds = format.frames / format.sampleRate
    const shortest =
      members[sources.findIndex((s) => framesAt(s, format.sampleRate) === format.frames)]
    // One warning per set, naming every clip that loses sound, longest cut first.
    const cuts = chosen
      .filter((take) => framesAt(sourceOfRow(take), format.sampleRate) > format.frames)
      .map((take) => ({ take, cut: soundAfter(take, setSeconds) }))
      .filter((c) => c.cut >= WARN_CUT_SECONDS)
      .sort((x, y) => y.cut - x.cut)
    if (cuts.length)
      warnings.push(
        `${label(set)}: trimming to ${setSeconds.toFixed(1)} s (the shortest take, clip ` +
          `${shortest.id}) cuts ` +
          cuts.map((c) => `${c.cut.toFixed(1)} s of sound from ${name(c.take)}`).join(', '),
      )

    reports.set(set, {
      originals: chosen.map((t) => ({
        clipId: t.id,
        sampleRate: t.sample_rate,
        channels: t.channels,
        bitDepth: t.bit_depth,
        durationS: t.duration_s,
      })),
      rendition: facts(format),
      takes: members.length,
      written: chosen.every((t) => {
        const stored = renditionOfRow(t)
        return stored !== null && sameSetFormat(stored.format, format)
      }),
    })
  }
  return reports
}
