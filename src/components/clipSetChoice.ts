import type { MatchedSet } from '@shared/schemas/clips'
import type { ClipSetSpec, ResolvedClipSet } from '@shared/schemas/sessions'

// How the clip-set picker ties what a design has chosen to the sets the library offers.

export const keyOf = (s: MatchedSet) => `${s.excerptId}|${s.performerCode}|${s.instrumentCode}`

/**
 * The chosen spec that stands for an offered set: the one with its key or, for designs saved
 * under other keys, the one playing any of its clips (a clip belongs to one set only).
 */
export function specFor(chosen: ClipSetSpec[], s: MatchedSet): ClipSetSpec | undefined {
  const key = keyOf(s)
  const ids = Object.values(s.cells).flat()
  return (
    chosen.find((c) => c.key === key) ??
    chosen.find((c) => c.clipIds.some((id) => ids.includes(id)))
  )
}

export type ArchivedClips = Map<number, { recipeId: number; recipeName: string }>

/** Archived clips of a saved design, by id, with the recipe each records. */
export function archivedClips(saved: ResolvedClipSet[] | undefined): ArchivedClips {
  const byId: ArchivedClips = new Map()
  for (const set of saved ?? []) for (const c of set.clips) if (c.archived) byId.set(c.id, c)
  return byId
}

/** "clip 12 (Aurel A bare)" for each archived clip a chosen spec still plays. */
export function archivedIn(spec: ClipSetSpec | undefined, archived: ArchivedClips) {
  return (spec?.clipIds ?? [])
    .filter((id) => archived.has(id))
    .map((id) => `clip ${id} (${archived.get(id)!.recipeName})`)
}

/** Recipes a chosen spec still plays through an archived clip: not missing, only not offered. */
export function keptRecipes(spec: ClipSetSpec | undefined, archived: ArchivedClips) {
  return (spec?.clipIds ?? []).flatMap((id) => {
    const c = archived.get(id)
    return c ? [c.recipeId] : []
  })
}
