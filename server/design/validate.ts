import { DesignError } from './errors.ts'
import type { DesignClipSet, Id, SessionDesignInput } from './types.ts'

/** What a format asks of a design: see server/formats. */
export interface DesignRules {
  minRecipes: number
  clipSets: 'none' | 'one-of-each' | 'any'
}

/**
 * Refuses a design that would give some player a broken plan. Checked before any draw, so a
 * bad session is refused when it is saved rather than when the tenth player opens it.
 */
export function checkDesign(input: SessionDesignInput, rules: DesignRules): void {
  const { format, recipes, clipSets, duplicates, seed } = input
  if (typeof seed !== 'string' || seed.length === 0) {
    throw new DesignError('A session needs a seed to deal its orders from')
  }
  if (!Number.isInteger(duplicates) || duplicates < 0) {
    throw new DesignError(`Duplicates must be a whole number from 0, got ${duplicates}`)
  }
  const needed = rules.minRecipes
  if (recipes.length < needed) {
    throw new DesignError(`A ${format} session needs at least ${needed} recipes`)
  }
  if (new Set(recipes).size !== recipes.length) {
    throw new DesignError('A recipe is listed twice in the session')
  }
  if (rules.clipSets === 'none') return

  if (clipSets.length === 0) throw new DesignError(`A ${format} session needs clips to play`)
  const inSession = new Set(recipes)
  const clipIds = new Set()
  const heard = new Set()
  for (const set of clipSets) {
    if (set.clips.length === 0) {
      throw new DesignError(`The clip set for excerpt "${set.excerptKey}" is empty`)
    }
    for (const clip of set.clips) {
      if (!inSession.has(clip.recipeId)) {
        throw new DesignError(`Clip ${String(clip.clipId)} is of a recipe not in the session`)
      }
      if (clipIds.has(clip.clipId)) {
        throw new DesignError(`Clip ${String(clip.clipId)} is listed twice in the session`)
      }
      clipIds.add(clip.clipId)
      heard.add(clip.recipeId)
    }
    checkTwins(set, clipIds)
    // Pairs and triangles compare recipes within a set; a gap would leave pairs unplayable.
    if (rules.clipSets === 'one-of-each') {
      const covered = new Set(set.clips.map((clip) => clip.recipeId))
      if (covered.size !== set.clips.length || covered.size !== recipes.length) {
        throw new DesignError(
          `The clip set for excerpt "${set.excerptKey}" must hold exactly one clip of each recipe`,
        )
      }
    }
  }
  const silent = recipes.find((id) => !heard.has(id))
  if (silent !== undefined) {
    throw new DesignError(`Recipe ${String(silent)} has no clip in the session`)
  }
}

/** A second take stands in for a recipe the set already plays, once, and is no other clip. */
function checkTwins(set: DesignClipSet, clipIds: Set<unknown>): void {
  const played = new Set(set.clips.map((clip) => clip.recipeId))
  const twinned = new Set<Id>()
  for (const twin of set.twins ?? []) {
    if (!played.has(twin.recipeId)) {
      throw new DesignError(
        `Clip ${String(twin.clipId)} is a second take of a recipe the set for excerpt "${set.excerptKey}" does not play`,
      )
    }
    if (twinned.has(twin.recipeId)) {
      throw new DesignError(
        `The set for excerpt "${set.excerptKey}" has two second takes of one recipe`,
      )
    }
    if (clipIds.has(twin.clipId)) {
      throw new DesignError(`Clip ${String(twin.clipId)} is listed twice in the session`)
    }
    twinned.add(twin.recipeId)
    clipIds.add(twin.clipId)
  }
}
