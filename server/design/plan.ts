import { sessionCodes, type SessionCodes } from './codeMap.ts'
import { DesignError } from './errors.ts'
import { pairTrials } from './pairs.ts'
import { createRandom, deriveSeed } from './random.ts'
import { placeRepeats } from './repeats.ts'
import { triangleTrials } from './triangle.ts'
import type {
  BlindClip,
  DesignClip,
  Id,
  PlannedTrial,
  PlayerPlan,
  SessionDesignInput,
} from './types.ts'
import { validateDesign } from './validate.ts'
import { williamsOrder } from './williams.ts'

/**
 * Player `playerIndex`'s trials in the order they are served, with blind codes. Nothing is
 * stored per player: the plan is rebuilt from the session's seed, so the same seed and index
 * always give the same plan. Pass `codes` when building many plans to draw the codes once.
 */
export function buildPlayerPlan(
  input: SessionDesignInput,
  playerIndex: number,
  codes: SessionCodes = sessionCodes(input),
): PlayerPlan {
  validateDesign(input)
  if (!Number.isInteger(playerIndex) || playerIndex < 0) {
    throw new DesignError(`A player index must be a whole number from 0, got ${playerIndex}`)
  }
  const trials = planTrials(input, playerIndex, codes)
  return { playerIndex, format: input.format, trials }
}

/** Plans for players 0…players−1, sharing one code map. */
export function buildSessionPlans(input: SessionDesignInput, players: number): PlayerPlan[] {
  const codes = sessionCodes(input)
  return Array.from({ length: players }, (_, i) => buildPlayerPlan(input, i, codes))
}

function planTrials(input: SessionDesignInput, p: number, codes: SessionCodes): PlannedTrial[] {
  const { format, recipes, clipSets, duplicates, seed } = input
  const blind = (clip: DesignClip, copy: number): BlindClip => ({
    ...clip,
    code: codes.clip(clip.clipId, copy),
  })
  const clipOf = (set: number, recipeId: Id) =>
    clipSets[set].clips.find((clip) => clip.recipeId === recipeId) as DesignClip
  const options = { playerIndex: p, seed, sets: clipSets.length, duplicates }

  switch (format) {
    case 'rating':
      return ratingTrials(input, p).map(({ item, repeatOf }) => ({
        kind: 'rating',
        excerptKey: clipSets[item.set].excerptKey,
        clip: blind(item.clip, repeatOf === null ? 0 : 1),
        repeatOf,
      }))
    case 'pair':
      return pairTrials(recipes, options).map((t) => {
        const copy = t.repeatOf === null ? 0 : 1
        return {
          kind: 'pair',
          excerptKey: clipSets[t.set].excerptKey,
          a: blind(clipOf(t.set, t.a), copy),
          b: blind(clipOf(t.set, t.b), copy),
          repeatOf: t.repeatOf,
        }
      })
    case 'triangle':
      return triangleTrials(recipes, options).map((t) => {
        // The doubled recipe's two servings take consecutive showings: 0 and 1, or 2 and 3.
        const served = new Map<Id, number>()
        const base = t.repeatOf === null ? 0 : 2
        const samples = t.samples.map((recipeId) => {
          const copy = base + (served.get(recipeId) ?? 0)
          served.set(recipeId, copy - base + 1)
          return blind(clipOf(t.set, recipeId), copy)
        }) as [BlindClip, BlindClip, BlindClip]
        const excerptKey = clipSets[t.set].excerptKey
        const { order, odd, repeatOf } = t
        return { kind: 'triangle', excerptKey, order, samples, odd, repeatOf }
      })
    case 'playtest': {
      const order = williamsOrder(recipes, p, deriveSeed(seed, 'playtest'))
      const random = createRandom(deriveSeed(seed, `playtest/player/${p}`))
      return placeRepeats(order, duplicates, random, (id) => id).map(({ item, repeatOf }) => ({
        kind: 'playtest',
        recipeId: item,
        code: codes.set(item, repeatOf === null ? 0 : 1),
        repeatOf,
      }))
    }
  }
}

/**
 * Excerpts in Williams order over the sets, and within each set the clips in Williams order.
 * Set s uses row p + s, so a player hears different recipe orders for different excerpts
 * while, for each set, consecutive players still walk through the rows of one square.
 */
function ratingTrials(input: SessionDesignInput, p: number) {
  const { clipSets, duplicates, seed } = input
  const sets = clipSets.map((_, s) => s)
  const main = williamsOrder(sets, p, deriveSeed(seed, 'rating/sets')).flatMap((set) =>
    williamsOrder(clipSets[set].clips, p + set, deriveSeed(seed, `rating/set/${set}`)).map(
      (clip) => ({ set, clip }),
    ),
  )
  const random = createRandom(deriveSeed(seed, `rating/player/${p}`))
  return placeRepeats(main, duplicates, random, (t) => t)
}
