import { describe, expect, it } from 'vitest'
import {
  DesignError,
  triangleOrderSequence,
  williamsRowCount,
  type BlindClip,
  type PairTrialPlan,
  type PlannedTrial,
  type PlaytestTrialPlan,
  type RatingTrialPlan,
  type SessionDesignInput,
  type TriangleTrialPlan,
} from '../../../server/design/index.ts'
import { buildPlayerPlan, buildSessionPlans, sessionCodes } from '../../../server/formats/index.ts'

const excerpts = ['open-strings', 'scale', 'phrase']

function design(overrides: Partial<SessionDesignInput> = {}): SessionDesignInput {
  const recipes = overrides.recipes ?? [11, 12, 13, 14]
  const sets =
    overrides.clipSets ??
    excerpts.map((excerptKey, s) => ({
      excerptKey,
      clips: recipes.map((recipeId, r) => ({ recipeId, clipId: 100 * (s + 1) + r })),
    }))
  return {
    format: 'rating',
    duplicates: 0,
    seed: 'session-a1',
    ...overrides,
    recipes,
    clipSets: sets,
  }
}

const clipsOf = (trial: PlannedTrial): BlindClip[] =>
  trial.kind === 'rating'
    ? [trial.clip]
    : trial.kind === 'pair'
      ? [trial.a, trial.b]
      : trial.kind === 'triangle'
        ? trial.samples
        : []

describe('buildPlayerPlan', () => {
  it('gives the same plan for the same seed and player, and another for another seed', () => {
    for (const format of ['rating', 'pair', 'triangle', 'playtest'] as const) {
      const input = design({ format, duplicates: 2 })
      expect(buildPlayerPlan(input, 5)).toEqual(buildPlayerPlan(input, 5))
      expect(buildPlayerPlan(input, 5)).not.toEqual(
        buildPlayerPlan({ ...input, seed: 'session-b2' }, 5),
      )
    }
  })

  it('shows a clip under one code to every player, other clips under other codes', () => {
    for (const format of ['rating', 'pair', 'triangle'] as const) {
      const plans = buildSessionPlans(design({ format }), 8)
      const codeOf = new Map<string, number>()
      for (const plan of plans) {
        for (const trial of plan.trials) {
          // A triangle serves one clip twice under two codes, so key by serving as well.
          const servings = new Map<number, number>()
          for (const clip of clipsOf(trial)) {
            const n = servings.get(Number(clip.clipId)) ?? 0
            servings.set(Number(clip.clipId), n + 1)
            const key = `${clip.clipId}#${n}`
            expect(codeOf.get(key) ?? clip.code).toBe(clip.code)
            codeOf.set(key, clip.code)
          }
        }
      }
      expect(new Set(codeOf.values()).size).toBe(codeOf.size)
    }
  })

  it('draws codes that do not depend on the order clips arrive in', () => {
    const input = design({ format: 'pair' })
    const reversed = {
      ...input,
      clipSets: [...input.clipSets].reverse().map((s) => ({ ...s, clips: [...s.clips].reverse() })),
    }
    const codes = sessionCodes(input)
    const again = sessionCodes(reversed)
    for (const set of input.clipSets) {
      for (const clip of set.clips) expect(again.clip(clip.clipId)).toBe(codes.clip(clip.clipId))
    }
    expect(new Set(codes.entries.map((e) => e.code)).size).toBe(codes.entries.length)
  })

  describe('attribute rating', () => {
    it('rates every clip once, excerpt by excerpt', () => {
      const plan = buildPlayerPlan(design(), 3)
      const trials = plan.trials as RatingTrialPlan[]
      expect(trials).toHaveLength(12)
      expect(new Set(trials.map((t) => t.clip.clipId)).size).toBe(12)
      const runs = trials.map((t) => t.excerptKey).filter((k, i, all) => k !== all[i - 1])
      expect([...runs].sort()).toEqual([...excerpts].sort())
    })

    it('balances recipe positions and carry-over within each excerpt over a complete block', () => {
      for (const recipes of [
        [11, 12, 13, 14],
        [11, 12, 13],
      ]) {
        const players = williamsRowCount(recipes.length)
        const plans = buildSessionPlans(design({ recipes }), players)
        for (const excerpt of excerpts) {
          const position = new Map<string, number>()
          const carry = new Map<string, number>()
          for (const plan of plans) {
            const order = (plan.trials as RatingTrialPlan[])
              .filter((t) => t.excerptKey === excerpt)
              .map((t) => t.clip.recipeId)
            order.forEach((r, i) => position.set(`${i}:${r}`, (position.get(`${i}:${r}`) ?? 0) + 1))
            for (let i = 1; i < order.length; i++) {
              const key = `${order[i - 1]}>${order[i]}`
              carry.set(key, (carry.get(key) ?? 0) + 1)
            }
          }
          // Williams (1949): equal positions and equal first-order carry-over per block.
          expect(position.size).toBe(recipes.length ** 2)
          for (const n of position.values()) expect(n).toBe(players / recipes.length)
          expect(carry.size).toBe(recipes.length * (recipes.length - 1))
          for (const n of carry.values()) expect(n).toBe(recipes.length % 2 === 0 ? 1 : 2)
        }
      }
    })

    it('balances the order of excerpts across players too', () => {
      const plans = buildSessionPlans(design(), 6)
      const firsts = plans.map((p) => (p.trials[0] as RatingTrialPlan).excerptKey)
      for (const excerpt of excerpts) expect(firsts.filter((e) => e === excerpt)).toHaveLength(2)
    })

    it('hides each duplicate under a code of its own, later in the session', () => {
      const plan = buildPlayerPlan(design({ duplicates: 3 }), 1)
      const trials = plan.trials as RatingTrialPlan[]
      expect(trials).toHaveLength(15)
      const repeats = trials.filter((t) => t.repeatOf !== null)
      expect(repeats).toHaveLength(3)
      trials.forEach((t, i) => {
        if (t.repeatOf === null) return
        const original = trials[t.repeatOf]
        expect(t.repeatOf).toBeLessThan(i - 1)
        expect(t.clip.clipId).toBe(original.clip.clipId)
        expect(t.clip.code).not.toBe(original.clip.code)
      })
      expect(new Set(trials.map((t) => t.clip.code)).size).toBe(15)
    })
  })

  describe('pair preference', () => {
    it('pairs every recipe with every other in each matched set, A and B balanced', () => {
      const plans = buildSessionPlans(design({ format: 'pair' }), 4)
      const lead = new Map<number, number>()
      for (const plan of plans) {
        const trials = plan.trials as PairTrialPlan[]
        expect(trials).toHaveLength(3 * 6)
        for (const t of trials) {
          const set = design().clipSets.find((s) => s.excerptKey === t.excerptKey)
          expect(set?.clips).toContainEqual({ recipeId: t.a.recipeId, clipId: t.a.clipId })
          expect(set?.clips).toContainEqual({ recipeId: t.b.recipeId, clipId: t.b.clipId })
          lead.set(Number(t.a.recipeId), (lead.get(Number(t.a.recipeId)) ?? 0) + 1)
          lead.set(Number(t.b.recipeId), (lead.get(Number(t.b.recipeId)) ?? 0) - 1)
        }
      }
      // ISO 5495: each recipe first as often as second across the panel.
      expect([...lead.values()]).toEqual([0, 0, 0, 0])
    })

    it('swaps A and B in a hidden duplicate and gives both clips new codes', () => {
      const trials = buildPlayerPlan(design({ format: 'pair', duplicates: 2 }), 0)
        .trials as PairTrialPlan[]
      for (const t of trials.filter((x) => x.repeatOf !== null)) {
        const original = trials[t.repeatOf as number]
        expect(t.a.clipId).toBe(original.b.clipId)
        expect(t.b.clipId).toBe(original.a.clipId)
        expect(t.a.code).not.toBe(original.b.code)
      }
    })
  })

  describe('triangle', () => {
    const input = design({ format: 'triangle', recipes: [21, 22] })

    it('serves the doubled clip under two codes so the codes cannot give the odd one away', () => {
      for (const plan of buildSessionPlans(input, 12)) {
        for (const t of plan.trials as TriangleTrialPlan[]) {
          expect(new Set(t.samples.map((s) => s.code)).size).toBe(3)
          const odd = t.samples[t.odd]
          const others = t.samples.filter((_, i) => i !== t.odd)
          expect(others[0].clipId).toBe(others[1].clipId)
          expect(odd.recipeId).not.toBe(others[0].recipeId)
        }
      }
    })

    it('deals the six orders once to each block of six players, per excerpt', () => {
      const plans = buildSessionPlans(input, 12)
      for (const excerpt of excerpts) {
        const orders = plans.map(
          (p) => (p.trials as TriangleTrialPlan[]).find((t) => t.excerptKey === excerpt)?.order,
        )
        // ISO 4120: the six orders equally often.
        expect(new Set(orders.slice(0, 6)).size).toBe(6)
        expect(new Set(orders.slice(6)).size).toBe(6)
      }
      expect(triangleOrderSequence(input.seed)).toContain(
        (plans[0].trials[0] as TriangleTrialPlan).order,
      )
    })
  })

  describe('play-test', () => {
    it('hands each player every coded set in Williams order with one code per recipe', () => {
      const input = design({ format: 'playtest', recipes: [31, 32, 33], clipSets: [] })
      const plans = buildSessionPlans(input, 6)
      const codeOf = new Map<number, number>()
      const position = new Map<string, number>()
      for (const plan of plans) {
        const trials = plan.trials as PlaytestTrialPlan[]
        expect(trials.map((t) => t.recipeId).sort()).toEqual([31, 32, 33])
        trials.forEach((t, i) => {
          expect(codeOf.get(Number(t.recipeId)) ?? t.code).toBe(t.code)
          codeOf.set(Number(t.recipeId), t.code)
          position.set(`${i}:${t.recipeId}`, (position.get(`${i}:${t.recipeId}`) ?? 0) + 1)
        })
      }
      expect(new Set(codeOf.values()).size).toBe(3)
      expect([...position.values()]).toEqual(Array(9).fill(2))
    })
  })

  describe('refusals', () => {
    it('refuses a pair or triangle set that is not matched', () => {
      const input = design({ format: 'pair' })
      input.clipSets[1].clips.pop()
      expect(() => buildPlayerPlan(input, 0)).toThrow(/exactly one clip of each recipe/)
    })

    it('refuses stray recipes, clips listed twice and recipes without clips', () => {
      const stray = design()
      stray.clipSets[0].clips.push({ recipeId: 99, clipId: 999 })
      expect(() => buildPlayerPlan(stray, 0)).toThrow(/not in the session/)
      const twice = design()
      twice.clipSets[1].clips[0].clipId = 100
      expect(() => buildPlayerPlan(twice, 0)).toThrow(/listed twice/)
      const silent = design({ recipes: [11, 12, 13, 14, 15] })
      silent.clipSets.forEach((s) => (s.clips = s.clips.filter((c) => c.recipeId !== 15)))
      expect(() => buildPlayerPlan(silent, 0)).toThrow(/no clip/)
    })

    it('refuses more duplicates than trials, a bad player index and an empty seed', () => {
      expect(() => buildPlayerPlan(design({ duplicates: 13 }), 0)).toThrow(DesignError)
      expect(() => buildPlayerPlan(design(), -1)).toThrow(/player index/)
      expect(() => buildPlayerPlan(design({ seed: '' }), 0)).toThrow(/seed/)
    })
  })
})
