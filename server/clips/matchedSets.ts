import type { Knex } from 'knex'
import type { MatchedSet, MatchedSetSection } from '../../shared/schemas/clips'

interface SetRow {
  id: number
  recipe_id: number
  recipe_name: string
  recipe_version: number
  instrument: MatchedSetSection['instrument']
  string_name: string
  excerpt_id: number
  excerpt_name: string
  performer_code: string
  instrument_code: string
  loudness_lufs: number
  rendition_gain_db: number
  rendition_loudness_lufs: number | null
}

/**
 * Clips grouped into matched sets (excerpt × performer × instrument), one section per
 * instrument and string, with the recipes recorded in that section as columns. A set is
 * complete when it holds a clip of every one of those recipes.
 */
export async function matchedSets(knex: Knex): Promise<MatchedSetSection[]> {
  // Archived clips and recipes are kept for the sessions that use them, not offered again.
  const rows: SetRow[] = await knex('clips as c')
    .join('recipes as r', 'r.id', 'c.recipe_id')
    .join('excerpts as e', 'e.id', 'c.excerpt_id')
    .whereNull('c.archived_at')
    .whereNull('r.archived_at')
    .select(
      'c.id',
      'c.recipe_id',
      'r.name as recipe_name',
      'r.version as recipe_version',
      'r.instrument',
      'r.string_name',
      'c.excerpt_id',
      'e.name as excerpt_name',
      'c.performer_code',
      'c.instrument_code',
      'c.loudness_lufs',
      'c.rendition_gain_db',
      'c.rendition_loudness_lufs',
    )
    .orderBy(['r.instrument', 'r.string_name', 'e.name', 'c.performer_code', 'c.instrument_code'])
    .orderBy('c.id')

  const sections = new Map<string, MatchedSetSection & { byKey: Map<string, MatchedSet> }>()
  for (const r of rows) {
    const sectionKey = `${r.instrument}|${r.string_name}`
    let section = sections.get(sectionKey)
    if (!section) {
      section = {
        instrument: r.instrument,
        stringName: r.string_name,
        recipes: [],
        sets: [],
        byKey: new Map(),
      }
      sections.set(sectionKey, section)
    }
    if (!section.recipes.some((x) => x.id === r.recipe_id))
      section.recipes.push({ id: r.recipe_id, name: r.recipe_name, version: r.recipe_version })
    const setKey = `${r.excerpt_id}|${r.performer_code}|${r.instrument_code}`
    let set = section.byKey.get(setKey)
    if (!set) {
      set = {
        excerptId: r.excerpt_id,
        excerptName: r.excerpt_name,
        performerCode: r.performer_code,
        instrumentCode: r.instrument_code,
        cells: {},
        complete: false,
        targetLufs: r.rendition_loudness_lufs ?? r.loudness_lufs + r.rendition_gain_db,
      }
      section.byKey.set(setKey, set)
      section.sets.push(set)
    }
    ;(set.cells[r.recipe_id] ??= []).push(r.id)
  }

  return [...sections.values()].map(({ byKey: _byKey, ...section }) => {
    section.recipes.sort((a, b) => a.name.localeCompare(b.name) || a.version - b.version)
    for (const set of section.sets)
      set.complete = section.recipes.every((r) => (set.cells[r.id]?.length ?? 0) > 0)
    return section
  })
}
