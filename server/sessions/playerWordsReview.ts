import type { Knex } from 'knex'
import { playerWordProblems, type PlayerTexts, type RecipeWords } from './playerWords'

// The player-words check inside the design review: the session's recipes read from the
// database (name, version, construction), their problems reported at the player fields.

export type { PlayerTexts }

interface RecipeWordsRow {
  id: number
  name: string
  version: number
  core: string
  windings: string
  damping_kind: string
  damping_grade: string
  damping_notes: string
}

export async function loadRecipeWords(db: Knex, recipeIds: number[]): Promise<RecipeWords[]> {
  if (recipeIds.length === 0) return []
  const rows: RecipeWordsRow[] = await db('recipes')
    .whereIn('id', recipeIds)
    .select('id', 'name', 'version', 'core', 'windings', 'damping_kind', 'damping_grade')
    .select('damping_notes')
  return rows.map((r) => ({
    name: r.name,
    version: r.version,
    core: r.core,
    windings: (JSON.parse(r.windings) as { material: string; profile: string }[]).map((w) => ({
      material: w.material,
      profile: w.profile,
    })),
    dampingKind: r.damping_kind,
    dampingGrade: r.damping_grade,
    dampingNotes: r.damping_notes,
  }))
}

/** Adds each problem of the player texts at its field; nothing to check without texts. */
export async function reviewPlayerWords(
  db: Knex,
  recipeIds: number[],
  texts: PlayerTexts | undefined,
  fail: (field: string, message: string) => void,
): Promise<void> {
  if (!texts) return
  const problems = playerWordProblems(await loadRecipeWords(db, recipeIds), texts)
  for (const [field, messages] of Object.entries(problems))
    for (const message of messages) fail(field, message)
}
