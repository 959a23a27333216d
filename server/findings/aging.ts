import { formatOf } from '../formats/index.ts'
import type { Knex } from 'knex'
import {
  ADJUSTMENT_LABEL,
  adjustP,
  oneSampleT,
  pairSentence,
  summarizeMean,
  wilcoxonSignedRank,
  type Adjustment,
  type Id,
  type Rating,
} from '../analysis/index.ts'
import type { SessionStatus } from '../../shared/schemas/sessions'
import type { AgingChange, AgingFindings, RecipeRef } from '../../shared/schemas/findings'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import { answersOf, inSubgroup, type Subgroup } from './summary'
import { attributeInfo } from './lineScale'
import { loadFindingsData } from './data'
import type { SessionRow } from '../sessions/rows'

/*
 * The time trend of an aging study: the same design rated again at later time points. Each
 * time point keeps its own exclusions; players are matched across time points by their code,
 * so a change is a paired comparison within the player, as the recipe pairs are.
 */

export interface TimePointRatings {
  sessionId: number
  label: string
  status: SessionStatus
  ratings: Rating[]
}

/** The time points of the study a session belongs to, oldest first; null for a lone session. */
export async function loadTimePoints(
  db: Knex,
  session: SessionRow,
  group: Subgroup,
): Promise<TimePointRatings[] | null> {
  if (!formatOf(session.format).findings.includes('aging')) return null
  const rootId = session.parent_session_id ?? session.id
  const family: Pick<SessionRow, 'id' | 'time_point_label' | 'status'>[] = await db('sessions')
    .where({ id: rootId })
    .orWhere({ parent_session_id: rootId })
    .orderBy('created_at')
    .orderBy('id')
    .select('id', 'time_point_label', 'status')
  const running = family.filter((f) => f.status !== 'draft')
  if (running.length < 2) return null
  const points: TimePointRatings[] = []
  for (const [index, f] of running.entries()) {
    const data = await loadFindingsData(db, f.id)
    const kept = new Set(
      data.players
        .filter((p) => inSubgroup(p, group) && p.exclusionReason === null)
        .map((p) => p.code),
    )
    points.push({
      sessionId: f.id,
      label: f.time_point_label ?? `time point ${index + 1}`,
      status: f.status,
      ratings: answersOf(data.resolved, kept).ratings,
    })
  }
  return points
}

/** Player means per recipe and attribute at one time point. */
function playerMeans(ratings: Rating[]): Map<string, Map<Id, number>> {
  const sums = new Map<string, Map<Id, { sum: number; n: number }>>()
  for (const r of ratings) {
    if (!Number.isFinite(r.value)) continue
    const cell = `${r.recipe}|${r.attribute}`
    let players = sums.get(cell)
    if (!players) sums.set(cell, (players = new Map()))
    const s = players.get(r.player) ?? { sum: 0, n: 0 }
    s.sum += r.value
    s.n++
    players.set(r.player, s)
  }
  return new Map(
    [...sums].map(([cell, players]) => [
      cell,
      new Map([...players].map(([p, s]) => [p, s.sum / s.n])),
    ]),
  )
}

export function agingFindings(
  points: TimePointRatings[],
  recipes: RecipeRef[],
  attributes: AttributeSpec[],
  adjustment: Adjustment = 'holm',
): AgingFindings {
  const means = points.map((p) => playerMeans(p.ratings))
  const info = attributeInfo(attributes)
  return {
    timePoints: points.map((p) => ({ sessionId: p.sessionId, label: p.label, status: p.status })),
    attributes: info.map((a) => {
      const series = recipes.map((recipe) => ({
        recipeId: recipe.id,
        name: recipe.name,
        points: points.map((p, t) => {
          const values = [...(means[t].get(`${recipe.id}|${a.id}`)?.values() ?? [])]
          const m = summarizeMean(values)
          return {
            sessionId: p.sessionId,
            label: p.label,
            n: m.n,
            mean: m.mean,
            ci: m.ci,
            reason: m.reason,
          }
        }),
      }))
      const raw: {
        row: Omit<AgingChange, 'adjustedP' | 'wilcoxonAdjustedP' | 'sentence'>
        t: ReturnType<typeof oneSampleT>
      }[] = []
      for (const recipe of recipes) {
        const first = means[0].get(`${recipe.id}|${a.id}`) ?? new Map<Id, number>()
        for (let later = 1; later < points.length; later++) {
          const then = means[later].get(`${recipe.id}|${a.id}`) ?? new Map<Id, number>()
          const d: number[] = []
          for (const [player, v] of first) {
            const w = then.get(player)
            if (w !== undefined) d.push(w - v)
          }
          const t = oneSampleT(d)
          const w = wilcoxonSignedRank(d)
          raw.push({
            t,
            row: {
              recipeId: recipe.id,
              name: recipe.name,
              from: points[0].label,
              to: points[later].label,
              n: t.n,
              difference: t.meanDifference,
              ci: t.ci,
              t: t.t,
              df: t.df,
              p: t.p,
              wilcoxonV: w.V,
              wilcoxonP: w.p,
              wilcoxonMethod: w.method,
              dz: t.dz,
              rankBiserial: w.rankBiserial,
              reason: t.reason,
            },
          })
        }
      }
      // One family per attribute and test, adjusted as the session chose, as the recipe pairs.
      const adjusted = adjustP(
        raw.map((r) => r.row.p),
        adjustment,
      )
      const adjustedW = adjustP(
        raw.map((r) => r.row.wilcoxonP),
        adjustment,
      )
      const changes = raw.map(({ row, t }, k) => ({
        ...row,
        adjustedP: adjusted[k],
        wilcoxonAdjustedP: adjustedW[k],
        sentence: pairSentence(
          {
            first: `${row.name} at ${row.from}`,
            second: `${row.name} at ${row.to}`,
            attribute: a.name,
            higher: a.higher,
          },
          t,
          adjusted[k],
          0.05,
          ADJUSTMENT_LABEL[adjustment],
        ),
      }))
      return { attribute: a.id, name: a.name, series, changes }
    }),
  }
}
