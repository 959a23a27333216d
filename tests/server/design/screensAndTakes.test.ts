import { describe, expect, it } from 'vitest'
import type {
  BlindClip,
  DesignClipSet,
  PlannedTrial,
  SessionDesignInput,
} from '../../../server/design/index.ts'
import { buildPlayerPlan, sessionCodes } from '../../../server/formats/index.ts'
import { SESSION_FORMATS, type SessionFormat } from '../../../shared/schemas/sessions'
import { screensOf } from '../../../server/player/plan'
import { servingsOf } from '../../../server/formats/answers'

// Screens a player sees, over many seeds: a matched set's first showings share one screen whole,
// and a hidden repeat stands on a screen of its own. Where a trial holds a recipe twice, the
// second serving is the set's second take of that recipe when the set has one.

const recipes = [1, 2, 3]

function sets(count: number, twins: boolean): DesignClipSet[] {
  return Array.from({ length: count }, (_, s) => ({
    excerptKey: `excerpt-${s}`,
    clips: recipes.map((recipeId) => ({ recipeId, clipId: 100 * (s + 1) + recipeId })),
    twins: twins
      ? recipes.map((recipeId) => ({ recipeId, clipId: 100 * (s + 1) + 50 + recipeId }))
      : undefined,
  }))
}

function input(
  format: SessionFormat,
  seed: string,
  clipSets: DesignClipSet[],
  duplicates: number,
): SessionDesignInput {
  return { format, recipes, clipSets: format === 'playtest' ? [] : clipSets, duplicates, seed }
}

/** Every screen of a plan: its trials, each with the clip ids it serves. */
function screens(trials: PlannedTrial[]): PlannedTrial[][] {
  const of = screensOf(trials)
  const out: PlannedTrial[][] = []
  trials.forEach((t, i) => (out[of[i]] ??= []).push(t))
  return out
}

const clipIds = (t: PlannedTrial) => servingsOf(t).map((c: BlindClip) => Number(c.clipId))

describe('repeats never split a set', () => {
  it('keeps the rating screen of 3 recipes whole with one hidden duplicate, over 30 players', () => {
    // The case of 3 recipes, one matched set and one duplicate: before, 8 of 30 orders put the
    // repeat between two of the set's recipes ("Page 1 of 3" with two recordings on page 1).
    const design = input('rating', 'split-check', sets(1, false), 1)
    const codes = sessionCodes(design)
    for (let p = 0; p < 30; p++) {
      const pages = screens(buildPlayerPlan(design, p, codes).trials)
      expect(pages.map((page) => page.length)).toEqual([3, 1])
    }
  })

  it('shows every matched set whole on one screen, over 200 seeds and every format', () => {
    for (const format of SESSION_FORMATS)
      for (let k = 0; k < 200; k++) {
        const setCount = 1 + (k % 3)
        const design = input(format, `seed-${k}`, sets(setCount, k % 2 === 0), 1 + (k % 3))
        const trials = buildPlayerPlan(design, k % 7).trials
        for (const page of screens(trials)) {
          const repeats = page.filter((t) => t.repeatOf !== null)
          if (repeats.length > 0) {
            expect(page).toHaveLength(1)
            continue
          }
          if (format !== 'rating') {
            expect(page).toHaveLength(1)
            continue
          }
          // A rating screen holds one set's first showings, every clip of it, once each.
          const set = design.clipSets.find((s) =>
            s.clips.some((c) => c.clipId === clipIds(page[0])[0]),
          )!
          expect(page.flatMap(clipIds).sort()).toEqual(set.clips.map((c) => c.clipId).sort())
        }
      }
  })
})

describe('twins from distinct takes', () => {
  const recipeOfServing = (c: BlindClip) => Number(c.recipeId)

  it('serves a triangle’s doubled recipe as two different clips when the set has a second take', () => {
    for (let k = 0; k < 50; k++) {
      const design = input('triangle', `tri-${k}`, sets(2, true), 1)
      for (const t of buildPlayerPlan(design, k % 6).trials) {
        const served = servingsOf(t)
        const ids = served.map((c) => Number(c.clipId))
        expect(new Set(ids).size).toBe(3)
        expect(new Set(served.map((c) => c.code)).size).toBe(3)
        // Still two of one recipe and one of the other.
        const counts = [...new Set(served.map(recipeOfServing))].map(
          (r) => served.filter((c) => recipeOfServing(c) === r).length,
        )
        expect(counts.sort()).toEqual([1, 2])
      }
    }
  })

  it('plays the second take in hidden repeats of ratings and pairs', () => {
    for (const format of ['rating', 'pair'] as const) {
      const design = input(format, `rep-${format}`, sets(2, true), 3)
      const trials = buildPlayerPlan(design, 1).trials
      const twins = new Set(design.clipSets.flatMap((s) => s.twins!.map((c) => c.clipId)))
      for (const t of trials) {
        const ids = clipIds(t)
        if (t.repeatOf === null) expect(ids.some((id) => twins.has(id))).toBe(false)
        else {
          expect(ids.every((id) => twins.has(id))).toBe(true)
          // The same recipes as the trial it repeats.
          const original = servingsOf(trials[t.repeatOf]).map(recipeOfServing).sort()
          expect(servingsOf(t).map(recipeOfServing).sort()).toEqual(original)
        }
      }
    }
  })

  it('falls back to the same clip under a code of its own when there is one take', () => {
    const design = input('triangle', 'one-take', sets(1, false), 0)
    for (const t of buildPlayerPlan(design, 0).trials) {
      const served = servingsOf(t)
      expect(new Set(served.map((c) => Number(c.clipId))).size).toBe(2)
      expect(new Set(served.map((c) => c.code)).size).toBe(3)
    }
  })

  it('refuses a second take of a recipe the set does not play, or two of one recipe', () => {
    const base = sets(1, false)[0]
    const stray = [{ ...base, twins: [{ recipeId: 9, clipId: 999 }] }]
    expect(() => buildPlayerPlan(input('triangle', 's', stray, 0), 0)).toThrow(/does not play/)
    const doubled = [
      {
        ...base,
        twins: [
          { recipeId: 1, clipId: 998 },
          { recipeId: 1, clipId: 997 },
        ],
      },
    ]
    expect(() => buildPlayerPlan(input('triangle', 's', doubled, 0), 0)).toThrow(/two second/)
    const reused = [{ ...base, twins: [{ recipeId: 1, clipId: base.clips[1].clipId }] }]
    expect(() => buildPlayerPlan(input('triangle', 's', reused, 0), 0)).toThrow(/listed twice/)
  })
})
