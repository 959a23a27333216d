import type { FormatModule } from '../formats/index.ts'
import type { ResolvedClip } from '../../shared/schemas/sessions'

// Second takes: where a trial holds one recipe twice (a triangle's twin, a hidden repeat), two
// servings of one recording differ only by inaudible noise, so a short script comparing the
// decoded files pairs them. A second take of the recipe (another recording in the same matched
// set) closes that; without one the designer is told, and opening asks them to accept it.

interface TakesSet {
  label: string
  matchKey: string
  clips: (ResolvedClip & { matchKey: string })[]
  twins: (ResolvedClip & { matchKey: string })[]
  twinClipIds: number[]
}

/** Does this design serve some recipe twice, so that a second take matters? */
export const servesTwice = (format: FormatModule, duplicates: number) =>
  format.clipSets !== 'none' && (format.kind === 'triangle' || duplicates > 0)

/**
 * Checks a set's second takes (each exists, is recorded in the set's conditions, and stands
 * in for a recipe the set plays, once) and returns the plain-words warning for the recipes
 * left with one take, or null.
 */
export function reviewTakes(
  set: TakesSet,
  twice: boolean,
  seen: Set<number>,
  fail: (field: string, message: string) => void,
): string | null {
  const played = new Set(set.clips.map((c) => c.recipeId))
  const twinned = new Set<number>()
  for (const id of set.twinClipIds) {
    const twin = set.twins.find((c) => c.id === id)
    if (!twin) {
      fail('clipSets', `Clip ${id} does not exist`)
      continue
    }
    if (seen.has(id)) fail('clipSets', `Clip ${id} is in two places in the session`)
    seen.add(id)
    if (twin.matchKey !== set.matchKey)
      fail('clipSets', `${set.label}: clip ${id} was recorded in other conditions`)
    if (!played.has(twin.recipeId))
      fail(
        'clipSets',
        `${set.label}: clip ${id} is a second take of a recipe the set does not play`,
      )
    else if (twinned.has(twin.recipeId))
      fail('clipSets', `${set.label}: two second takes of ${twin.recipeName}`)
    twinned.add(twin.recipeId)
  }
  if (!twice) return null
  const single = [...new Map(set.clips.map((c) => [c.recipeId, c.recipeName])).entries()]
    .filter(([recipeId]) => !twinned.has(recipeId))
    .map(([, name]) => name)
  if (single.length === 0) return null
  return (
    `${set.label}: ${listed(single)} ${single.length === 1 ? 'has' : 'have'} one take, so a ` +
    'trial that holds such a recipe twice plays the same recording twice. A player with audio ' +
    'tools could compare the two files and find the pair. Record a second take, or accept ' +
    'this when you open the session.'
  )
}

const listed = (names: string[]) =>
  names.length <= 1
    ? (names[0] ?? '')
    : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`
