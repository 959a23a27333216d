import { createRandom, type BlindClip, type PlannedTrial } from '../../server/design/index.ts'
import type { TrialAnswer } from '../../shared/schemas/rating'
import { DAMPING_PROFILE, PREFERENCE_STRENGTH, type DemoSession } from './story'

// The demo players' invented answers, in the players' own format: blind codes and attribute
// keys. Each leans the way the recipes were made, so the findings have something to find.

const random = createRandom('larchmere-demo-answers')

export interface AnswerContext {
  recipeRank: Map<number, number>
  playerIndex: number
  trialIndex: number
  demo: DemoSession
}

const clampScale = (x: number) => Math.max(0, Math.min(100, Math.round(x)))
/** A draw fixed by its key alone, so the story holds whatever order the session seed deals. */
const keyed = (...parts: (string | number)[]) => createRandom(parts.join('/')).next()

function ratedValues(t: PlannedTrial, c: AnswerContext): Record<string, number> {
  const recipe = Number(
    t.kind === 'rating' ? t.clip.recipeId : t.kind === 'playtest' ? t.recipeId : 0,
  )
  const rank = c.recipeRank.get(recipe) ?? 0
  const values: Record<string, number> = {}
  if (!c.demo.profiled) {
    const lean = rank * 12
    values.brightness = clampScale(75 - lean + random.next() * 20)
    values.bow_response = clampScale(40 + lean + random.next() * 20)
    values.warmth = clampScale(45 + lean / 2 + random.next() * 20)
    return values
  }
  const set = t.kind === 'rating' ? t.excerptKey : ''
  const p = c.playerIndex
  for (const [key, means] of Object.entries(DAMPING_PROFILE)) {
    if (p === c.demo.randomPlayer) {
      values[key] = erratic(p, c.trialIndex, t.repeatOf, key, means[rank])
      continue
    }
    // Each player sits a little higher or lower on the scale; within a player, a rating
    // scatters a few points, and a hidden repeat lands within a few points of the first.
    const offset = (keyed('offset', p, key) - 0.5) * 16
    const noise = (keyed('noise', p, recipe, key, set) - 0.5) * 12
    const repeat = t.repeatOf === null ? 0 : (keyed('repeat', p, c.trialIndex, key) - 0.5) * 8
    values[key] = clampScale(means[rank] + offset + noise + repeat)
  }
  return values
}

/**
 * A player who rates all over the scale: wide scatter around the panel, and every hidden
 * repeat at least 25 points away from its first rating, so the reliability rule must flag them.
 */
function erratic(
  p: number,
  trialIndex: number,
  repeatOf: number | null,
  key: string,
  mean: number,
): number {
  const first = (k: number) => clampScale(mean + (keyed('erratic', p, k, key) - 0.5) * 70)
  if (repeatOf === null) return first(trialIndex)
  const base = first(repeatOf)
  const jump = 25 + keyed('erratic/jump', p, trialIndex, key) * 20
  return clampScale(base >= 50 ? base - jump : base + jump)
}

/** An invented answer in the players' own format, leaning the way the recipes were made. */
export function demoAnswer(t: PlannedTrial, c: AnswerContext): TrialAnswer {
  switch (t.kind) {
    case 'rating':
      return { kind: 'rating', values: ratedValues(t, c) }
    case 'playtest':
      return { kind: 'playtest', values: ratedValues(t, c), comment: '' }
    case 'pair': {
      const rank = (clip: BlindClip) => c.recipeRank.get(Number(clip.recipeId)) ?? 0
      const strength = (clip: BlindClip) => PREFERENCE_STRENGTH[rank(clip)] ?? 0
      const aWins = random.next() < 1 / (1 + Math.exp(strength(t.b) - strength(t.a)))
      // Less damping (a lower rank) sounds brighter; more damping answers the bow sooner.
      const [lighter, heavier] = rank(t.a) < rank(t.b) ? [t.a, t.b] : [t.b, t.a]
      const pick = (chance: number, likely: BlindClip, other: BlindClip) =>
        (random.next() < chance ? likely : other).code
      return {
        kind: 'pair',
        preferred: (aWins ? t.a : t.b).code,
        more: {
          brightness: pick(0.85, lighter, heavier),
          bow_response: pick(0.75, heavier, lighter),
          warmth: pick(0.5, lighter, heavier),
        },
      }
    }
    case 'triangle': {
      // The last cellist never hears it; the others always do.
      const hears = c.playerIndex !== 3
      const chosen = hears ? t.odd : (t.odd + 1) % 3
      return { kind: 'triangle', odd: t.samples[chosen].code }
    }
  }
}
