/* Clip measures set against perception: Spearman per measure and attribute, with its points. */
import { CLIP_MEASURES, type MeasureEntry } from '../../shared/measures'
import {
  correlateMeasures,
  perceivedMeans,
  type ClipMeasure,
  type Rating,
} from '../analysis/index.ts'
import type { AttributeSpec } from '../../shared/schemas/sessions'
import type { ObjectiveRow } from '../../shared/schemas/findings'

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
  // One set of clip means serves both the correlations and the points drawn behind them.
  const perceived = perceivedMeans(clipRatings, (r) => r.clip)
  const attributeIds = [
    ...new Map(clipRatings.map((r) => [String(r.attribute), r.attribute])).values(),
  ]
  const engine = correlateMeasures(measures, perceived, attributeIds, 'clip')
  const names = new Map(attributes.map((a) => [a.key, a.name]))
  const rows: ObjectiveRow[] = []
  for (const m of CORRELATED_MEASURES) {
    for (const a of attributes) {
      const found = engine.find((e) => e.measure === m.name && e.attribute === a.key)
      const points = clips.flatMap((clip) => {
        const x = clip[m.column]
        const y = perceived.get(String(clip.id))?.get(a.key)
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
        pearsonR: found?.pearsonR ?? null,
        pearsonP: found?.pearsonP ?? null,
        pearsonCi: found?.pearsonCi ?? null,
        n: found?.n ?? points.length,
        reason: found ? found.reason : 'fewer than three pairs',
        points,
      })
    }
  }
  return rows
}
