import { CLIP_MEASURES, type MeasureEntry } from '../../shared/measures'
import {
  computeFindings,
  formatP,
  holm,
  objectiveVsPerceived,
  preferenceFindings,
  reliability,
  signTest,
  triangleTest,
  type AttributeFindings as EngineAttribute,
  type ClipMeasure,
  type Id,
  type Rating,
} from '../analysis/index.ts'
import type { Instrument, PlayerLevel } from '../../shared/constants'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import type {
  AttributeFindings,
  FindingsSummary,
  MorePair,
  ObjectiveRow,
  PreferenceFindings,
  RecipeRef,
  ReliabilityFindings,
  TriangleFindings,
} from '../../shared/schemas/findings'
import type { ResolvedAnswers } from './answersToRatings'
import type { SessionPlayer } from './data'

/*
 * From resolved answers to the figures of the findings page. Pure: the same data and filter
 * always give the same page, which is what lets an exclusion "recompute at once".
 */

export interface Subgroup {
  instrument?: Instrument
  level?: PlayerLevel
}

/** Comparatives for the default attributes, so sentences read "brighter", not "higher on". */
const HIGHER: Record<string, string> = {
  brightness: 'brighter',
  warmth: 'warmer',
  bow_response: 'quicker to respond',
}

export const inSubgroup = (p: SessionPlayer, g: Subgroup) =>
  (!g.instrument || p.instruments.includes(g.instrument)) && (!g.level || p.level === g.level)

/** The resolved answers of the given players only. */
export function answersOf(r: ResolvedAnswers, players: ReadonlySet<Id>): ResolvedAnswers {
  const keep = <T extends { player: Id }>(list: T[]) => list.filter((x) => players.has(x.player))
  return {
    ratings: keep(r.ratings),
    preferences: keep(r.preferences),
    more: keep(r.more),
    triangles: keep(r.triangles),
    rows: keep(r.rows),
  }
}

export function summaryOf(players: SessionPlayer[], answers: number): FindingsSummary {
  const done = players.filter((p) => p.done).length
  return {
    invited: players.length,
    done,
    inProgress: players.filter((p) => p.started && !p.done).length,
    excluded: players.filter((p) => p.exclusionReason !== null).length,
    answers,
    completion: players.length > 0 ? done / players.length : 0,
  }
}

export function attributeInfo(attributes: AttributeSpec[]) {
  return attributes.map((a) => ({ id: a.key, name: a.name, higher: HIGHER[a.key] }))
}

export function lineScaleFindings(
  ratings: Rating[],
  recipes: RecipeRef[],
  attributes: AttributeSpec[],
  excluded: Id[],
): AttributeFindings[] {
  const findings = computeFindings({
    ratings,
    recipes,
    attributes: attributeInfo(attributes),
    excludedPlayers: excluded,
  })
  const spec = new Map(attributes.map((a) => [a.key, a]))
  return findings.attributes.map((a) => toShared(a, spec.get(String(a.attribute))))
}

// The engine takes ids of either kind; ours are recipe numbers and attribute keys.
function toShared(a: EngineAttribute, spec: AttributeSpec | undefined): AttributeFindings {
  return {
    attribute: String(a.attribute),
    name: a.name,
    low: spec?.low ?? '',
    high: spec?.high ?? '',
    players: a.players,
    recipes: a.recipes.map((r) => ({ ...r, recipe: Number(r.recipe) })),
    pairs: a.pairs.map((p) => ({ ...p, first: Number(p.first), second: Number(p.second) })),
    omnibus: { ...a.omnibus, recipes: a.omnibus.recipes.map(Number) },
  }
}

const percent = (x: number) => `${Math.round(x * 100)}%`

export function pairPreferences(
  answers: ResolvedAnswers,
  recipes: RecipeRef[],
  attributes: AttributeSpec[],
): PreferenceFindings {
  const names = new Map<Id, string>(recipes.map((r) => [r.id, r.name]))
  const name = (id: Id) => names.get(id) ?? String(id)
  const ids = recipes.map((r) => r.id)
  const engine = preferenceFindings(answers.preferences, ids, name)
  return {
    answers: answers.preferences.length,
    pairs: engine.pairs.map((p) => ({ ...p, first: Number(p.first), second: Number(p.second) })),
    scale: {
      items: engine.scale.items.map(Number),
      reference: engine.scale.reference === null ? null : Number(engine.scale.reference),
      abilities: engine.scale.abilities.map((a) => ({
        ...a,
        item: Number(a.item),
        name: name(a.item),
      })),
      winProbability: engine.scale.winProbability,
      converged: engine.scale.converged,
      reason: engine.scale.reason,
    },
    attributes: attributes.map((a) => ({
      attribute: a.key,
      name: a.name,
      pairs: morePairs(answers, a, ids, name),
    })),
  }
}

/** Sign tests for "which has more", Holm-adjusted within the attribute like the rated pairs. */
function morePairs(
  answers: ResolvedAnswers,
  attribute: AttributeSpec,
  ids: number[],
  name: (id: Id) => string,
): MorePair[] {
  const raw: Omit<MorePair, 'holmP' | 'sentence'>[] = []
  for (let i = 0; i < ids.length; i++) {
    for (let j = i + 1; j < ids.length; j++) {
      let firstMore = 0
      let secondMore = 0
      for (const m of answers.more) {
        if (m.attribute !== attribute.key) continue
        const samePair =
          (m.first === ids[i] && m.second === ids[j]) || (m.first === ids[j] && m.second === ids[i])
        if (!samePair) continue
        if (m.more === ids[i]) firstMore++
        else secondMore++
      }
      if (firstMore + secondMore === 0) continue
      raw.push({
        first: ids[i],
        second: ids[j],
        firstMore,
        secondMore,
        test: signTest(firstMore, secondMore),
      })
    }
  }
  const adjusted = holm(raw.map((r) => r.test.p))
  const word = HIGHER[attribute.key] ?? `higher on ${attribute.name.toLowerCase()}`
  return raw.map((r, k) => {
    const firstLeads = r.firstMore >= r.secondMore
    const lead = firstLeads ? r.firstMore : r.secondMore
    const total = r.firstMore + r.secondMore
    const holmP = adjusted[k]
    const sentence =
      `${name(firstLeads ? r.first : r.second)} was judged ${word} than ` +
      `${name(firstLeads ? r.second : r.first)} in ${lead} of ${total} choices (${percent(lead / total)})` +
      (holmP === null ? '.' : `, Holm p ${formatP(holmP)}.`)
    return { ...r, holmP, sentence }
  })
}

export function triangleFindings(answers: ResolvedAnswers): TriangleFindings {
  const first = answers.triangles.filter((t) => !t.repeat)
  const correct = first.filter((t) => t.correct).length
  const result = triangleTest(correct, first.length)
  return {
    ...result,
    repeatsSetAside: answers.triangles.length - first.length,
    verdict: triangleVerdict(result),
  }
}

function triangleVerdict(r: ReturnType<typeof triangleTest>): string {
  if (r.p === null || r.pd === null || r.pdCi === null) {
    return 'Not enough data: nobody has picked an odd one out yet.'
  }
  const head = `${r.correct} of ${r.n} answers picked the odd one out (${percent(r.correct / r.n)}; guessing gives 33%)`
  if (r.minimumCorrect05 === null) {
    return `${head}. With only ${r.n} answers even a perfect score would not reach the 0.05 level.`
  }
  const needed = `${r.minimumCorrect05} were needed at the 0.05 level`
  const pd = `an estimated ${percent(r.pd)} of the panel tell them apart (95% CI ${percent(r.pdCi.lower)} to ${percent(r.pdCi.upper)})`
  return r.p <= 0.05
    ? `${head}; ${needed}, so players can hear a difference (p ${formatP(r.p)}): ${pd}.`
    : `${head}; ${needed}, so this panel did not show an audible difference (p ${formatP(r.p)}); ${pd}.`
}

export function reliabilityFindings(
  ratings: Rating[],
  players: SessionPlayer[],
): ReliabilityFindings {
  const engine = reliability(ratings)
  const byCode = new Map(engine.players.map((p) => [String(p.player), p]))
  return {
    rule: engine.rule,
    // Every player who answered is listed, so one with no repeats can still be excluded.
    players: players
      .filter((p) => p.started || byCode.has(p.code) || p.exclusionReason !== null)
      .map((p) => {
        const r = byCode.get(p.code)
        return {
          playerCode: p.code,
          duplicatePairs: r?.duplicatePairs ?? 0,
          misses: r?.misses ?? 0,
          missShare: r?.missShare ?? null,
          looSpearman: r?.panelAgreement ?? null,
          flagged: r?.flagged ?? false,
          excluded: p.exclusionReason !== null,
          exclusionReason: p.exclusionReason,
          reason: r ? r.reason : 'not enough data',
        }
      }),
  }
}

/** The measures findings set against perception, in the order of the registry. */
export const CORRELATED_MEASURES = CLIP_MEASURES.filter(
  (m): m is Extract<MeasureEntry, { correlate: true }> => m.correlate,
)

/** A clip's id, recipe and correlated measures, by column. */
export type ClipMeasureRow = { id: number; recipe_id: number } & {
  [C in (typeof CORRELATED_MEASURES)[number]['column']]: number | null
}

/** Spearman between each clip measure and each attribute, with the points behind each rho. */
export function objectiveFindings(
  ratings: Rating[],
  clips: ClipMeasureRow[],
  attributes: AttributeSpec[],
): ObjectiveRow[] {
  const measures: ClipMeasure[] = []
  for (const clip of clips)
    for (const m of CORRELATED_MEASURES) {
      const value = clip[m.column]
      if (typeof value === 'number' && Number.isFinite(value))
        measures.push({ clip: clip.id, recipe: clip.recipe_id, measure: m.name, value })
    }
  const clipRatings = ratings.filter((r) => typeof r.clip === 'number')
  const engine = objectiveVsPerceived(measures, clipRatings, { level: 'clip' })
  const perceived = clipMeans(clipRatings)
  const names = new Map(attributes.map((a) => [a.key, a.name]))
  const rows: ObjectiveRow[] = []
  for (const m of CORRELATED_MEASURES) {
    for (const a of attributes) {
      const found = engine.find((e) => e.measure === m.name && e.attribute === a.key)
      const points = clips.flatMap((clip) => {
        const x = clip[m.column]
        const y = perceived.get(`${clip.id}|${a.key}`)
        return typeof x === 'number' && Number.isFinite(x) && y !== undefined
          ? [{ x, y, clipId: clip.id, recipeId: clip.recipe_id }]
          : []
      })
      rows.push({
        measure: m.name,
        unit: m.unit,
        attribute: a.key,
        name: names.get(a.key) ?? a.key,
        rho: found?.rho ?? null,
        p: found?.p ?? null,
        n: found?.n ?? points.length,
        reason: found ? found.reason : 'not enough data',
        points,
      })
    }
  }
  return rows
}

/** Per clip and attribute, the mean of player means: the same y the engine correlates. */
function clipMeans(ratings: Rating[]): Map<string, number> {
  const perPlayer = new Map<string, { sum: number; n: number }>()
  for (const r of ratings) {
    const k = `${r.clip}|${r.attribute}|${r.player}`
    const s = perPlayer.get(k) ?? { sum: 0, n: 0 }
    s.sum += r.value
    s.n++
    perPlayer.set(k, s)
  }
  const perClip = new Map<string, { sum: number; n: number }>()
  for (const [k, s] of perPlayer) {
    const clipKey = k.slice(0, k.lastIndexOf('|'))
    const c = perClip.get(clipKey) ?? { sum: 0, n: 0 }
    c.sum += s.sum / s.n
    c.n++
    perClip.set(clipKey, c)
  }
  return new Map([...perClip].map(([k, c]) => [k, c.sum / c.n]))
}
