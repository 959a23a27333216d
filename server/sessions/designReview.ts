import type { Knex } from 'knex'
import { validationFailed } from '../errors'
import { DesignError } from '../design/index.ts'
import { buildPlayerPlan, sessionCodes, validateDesign } from '../formats/index.ts'
import { clipIdsOfSet, designInput, type StoredDesign } from './rows'
import { reviewTakes, servesTwice } from './takes'
import { formatOf } from '../formats/index.ts'
import { reviewPlayerWords, type PlayerTexts } from './playerWordsReview'
import { reviewSetFormats } from './setFormats'
import type { ResolvedClipSet } from '../../shared/schemas/sessions'

interface ClipInfo {
  id: number
  recipe_id: number
  recipe_name: string
  recipe_version: number
  excerpt_name: string
  performer_code: string
  instrument_code: string
  original_name: string
  archived_at: string | null
}

export interface DesignReview {
  /** Field → what makes the design impossible. */
  errors: Record<string, string[]>
  warnings: string[]
  recipes: { id: number; name: string }[]
  clipSets: ResolvedClipSet[]
  /** Trials per player, duplicates included; 0 while the design has errors. */
  trialCount: number
  /** Sets where a recipe served twice has one take: opening asks the designer to accept it. */
  sameTake: string[]
}

const recipeLabel = (name: string, version: number) => (version > 1 ? `${name} v${version}` : name)

const today = (now: Date) => now.toISOString().slice(0, 10)

/**
 * Everything the designer needs to hear about a design: what makes it impossible (by field,
 * so the form can show each message where it belongs) and what is allowed but worth a look.
 */
export async function reviewDesign(
  db: Knex,
  design: StoredDesign & { deadline: string; playerWords?: PlayerTexts },
  now: Date | null,
): Promise<DesignReview> {
  const errors: Record<string, string[]> = {}
  const fail = (field: string, message: string) => (errors[field] ??= []).push(message)
  const warnings: string[] = []
  const sameTake: string[] = []

  const recipeRows: { id: number; name: string; version: number; archived_at: string | null }[] =
    design.recipeIds.length
      ? await db('recipes')
          .whereIn('id', design.recipeIds)
          .select('id', 'name', 'version', 'archived_at')
      : []
  for (const r of recipeRows)
    if (r.archived_at) warnings.push(`${recipeLabel(r.name, r.version)} is archived`)
  const recipeName = new Map(recipeRows.map((r) => [r.id, recipeLabel(r.name, r.version)]))
  for (const id of design.recipeIds)
    if (!recipeName.has(id)) fail('recipeIds', `Recipe ${id} does not exist`)
  if (new Set(design.recipeIds).size !== design.recipeIds.length)
    fail('recipeIds', 'A recipe is chosen twice')
  const recipes = design.recipeIds
    .filter((id) => recipeName.has(id))
    .map((id) => ({ id, name: recipeName.get(id)! }))

  const format = formatOf(design.format)
  const listening = format.clipSets !== 'none'
  const clipSets = listening ? await resolveSets(db, design) : []
  if (listening) {
    if (design.clipSets.length === 0)
      fail('clipSets', 'Choose at least one matched clip set: this format plays recordings')
    const seen = new Set<number>()
    for (const set of clipSets) {
      const label = set.excerptName ? `Set '${setLabel(set)}'` : `Set '${set.key}'`
      for (const id of set.clipIds) {
        if (!set.clips.some((c) => c.id === id)) fail('clipSets', `Clip ${id} does not exist`)
        if (set.clips.some((c) => c.id === id && c.archived))
          warnings.push(`${label}: clip ${id} is archived`)
        if (seen.has(id)) fail('clipSets', `Clip ${id} is in two sets`)
        seen.add(id)
      }
      const takes = { ...set, label, matchKey: set.clips[0]?.matchKey ?? '' }
      const single = reviewTakes(takes, servesTwice(format, design.duplicates), seen, fail)
      if (single) sameTake.push(single)
      const keys = new Set(set.clips.map((c) => c.matchKey))
      if (keys.size > 1)
        fail(
          'clipSets',
          `${label} mixes recordings: its clips must share excerpt, performer and instrument`,
        )
      for (const c of set.clips)
        if (!recipeName.has(c.recipeId))
          fail('clipSets', `${label} holds a clip of ${c.recipeName}, which is not in the session`)
      const counts = new Map<number, number>()
      for (const c of set.clips) counts.set(c.recipeId, (counts.get(c.recipeId) ?? 0) + 1)
      for (const r of recipes) {
        const n = counts.get(r.id) ?? 0
        if (n === 0 && format.clipSets === 'any') warnings.push(`${label} has no clip of ${r.name}`)
        else if (n === 0)
          fail('clipSets', `${label} has no clip of ${r.name}: every recipe needs one`)
        else if (n > 1 && format.clipSets === 'one-of-each')
          fail('clipSets', `${label} holds ${n} clips of ${r.name}; pairs and triangles need one`)
      }
    }
  }
  const setFormats = await reviewSetFormats(db, clipSets, fail, warnings)
  if (format.findings.includes('attributes') && design.attributes.length === 0)
    fail('attributes', 'Choose at least one attribute to rate')
  if (now && design.deadline < today(now))
    fail('deadline', 'The deadline has passed; choose today or a later day')

  let trialCount = 0
  if (Object.keys(errors).length === 0) {
    const recipeOfClip = new Map(
      clipSets.flatMap((s) => [...s.clips, ...s.twins].map((c) => [c.id, c.recipeId])),
    )
    trialCount = countTrials(design, recipeOfClip, fail)
  }
  // After the trial count: words players must not see never make the plan impossible.
  await reviewPlayerWords(db, design.recipeIds, design.playerWords, fail)
  const resolved = clipSets.map((s) => ({ ...stripMatch(s), format: setFormats.get(s) }))
  return { errors, warnings, recipes, clipSets: resolved, trialCount, sameTake }
}

/** Throws the review's errors as one 422 with messages at their fields. */
export function assertPossible(review: DesignReview): void {
  if (Object.keys(review.errors).length > 0)
    throw validationFailed('This design cannot be run as it is', { fields: review.errors })
}

function countTrials(
  design: StoredDesign,
  recipeOfClip: Map<number, number>,
  fail: (field: string, message: string) => void,
): number {
  try {
    const base = designInput({ ...design, duplicates: 0 }, recipeOfClip)
    validateDesign(base)
    const perPlayer = buildPlayerPlan(base, 0).trials.length
    if (design.duplicates > perPlayer) {
      fail(
        'duplicates',
        `At most ${perPlayer}: each player has ${perPlayer} trial${perPlayer === 1 ? '' : 's'} that could repeat`,
      )
      return 0
    }
    const full = designInput(design, recipeOfClip)
    // Drawing the codes once here finds a session too large for three-digit codes.
    sessionCodes(full)
    return perPlayer + design.duplicates
  } catch (err) {
    if (!(err instanceof DesignError)) throw err
    fail(formatOf(design.format).clipSets === 'none' ? 'recipeIds' : 'clipSets', err.message)
    return 0
  }
}

type ClipWithMatch = ResolvedClipSet['clips'][number] & { matchKey: string }
type SetWithMatch = Omit<ResolvedClipSet, 'clips' | 'twins'> & {
  clips: ClipWithMatch[]
  twins: ClipWithMatch[]
  twinClipIds: number[]
}

const setLabel = (s: Pick<ResolvedClipSet, 'excerptName' | 'performerCode' | 'instrumentCode'>) =>
  `${s.excerptName} · ${s.performerCode} · ${s.instrumentCode}`

const stripMatch = (s: SetWithMatch): ResolvedClipSet => ({
  ...s,
  clips: s.clips.map(({ matchKey: _m, ...c }) => c),
  twins: s.twins.map(({ matchKey: _m, ...c }) => c),
})

async function resolveSets(db: Knex, design: StoredDesign): Promise<SetWithMatch[]> {
  const ids = [...new Set(design.clipSets.flatMap(clipIdsOfSet))]
  const rows: ClipInfo[] = ids.length
    ? await db('clips as c')
        .join('recipes as r', 'r.id', 'c.recipe_id')
        .join('excerpts as e', 'e.id', 'c.excerpt_id')
        .whereIn('c.id', ids)
        .select(
          'c.id',
          'c.recipe_id',
          'r.name as recipe_name',
          'r.version as recipe_version',
          'e.name as excerpt_name',
          'c.performer_code',
          'c.instrument_code',
          'c.original_name',
          'c.archived_at',
        )
    : []
  const byId = new Map(rows.map((r) => [r.id, r]))
  const resolve = (id: number): ClipWithMatch[] => {
    const r = byId.get(id)
    return r
      ? [
          {
            id: r.id,
            recipeId: r.recipe_id,
            recipeName: recipeLabel(r.recipe_name, r.recipe_version),
            originalName: r.original_name,
            archived: r.archived_at !== null,
            matchKey: `${r.excerpt_name}|${r.performer_code}|${r.instrument_code}`,
          },
        ]
      : []
  }
  return design.clipSets.map((spec) => {
    const clips = spec.clipIds.flatMap(resolve)
    const first = clips.length ? byId.get(clips[0].id)! : null
    return {
      key: spec.key,
      clipIds: spec.clipIds,
      twinClipIds: spec.twinClipIds ?? [],
      excerptName: first?.excerpt_name ?? '',
      performerCode: first?.performer_code ?? '',
      instrumentCode: first?.instrument_code ?? '',
      clips,
      twins: (spec.twinClipIds ?? []).flatMap(resolve),
    }
  })
}
