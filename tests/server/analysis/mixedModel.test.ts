import { describe, expect, it } from 'vitest'
import {
  mixedModel,
  type MixedModelRating,
  type MixedModelResult,
} from '../../../server/analysis/mixedModel'
import fixture from './fixtures/mixedModel.json'

// Reference fits from R 4.2.2 with lme4 1.1-31, lmerTest 3.1-3 and emmeans 1.8.4-1, made by
// fixtures/mixedModel.R beside the JSON on panels it invents with set.seed:
//   lmerTest::lmer(value ~ recipe + (1 | player) [+ (1 | player:recipe)], REML = TRUE)
//   as.data.frame(VarCorr(m))$vcov, REMLcrit(m)
//   anova(m, type = 3, ddf = "Satterthwaite")
//   emmeans(m, ~ recipe, lmer.df = "satterthwaite")
//   pairs(emm, adjust = "tukey") and pairs(emm, adjust = "none")
// R's optimiser (bobyqa, rhoend 1e-12) stops a few parts in 1e8 short of the optimum, so the
// script polishes its theta with Newton steps on lme4's own deviance function before taking any
// figure. What is left is lmerTest's numerical derivatives (about 1e-8), so figures are compared
// to 1e-7 relative, tighter than the 1e-6 asked of the model; p values to 1e-6 relative or,
// near 0, 1e-9 absolute (R's ptukey and jStat's both form 1 − lower tail).

type Case = (typeof fixture.cases)[number]

const TOL = 1e-7

const ratingsOf = (c: Case): MixedModelRating[] =>
  c.ratings.map(([player, recipe, value]) => ({
    player: player as string,
    recipe: recipe as string,
    value: value as number,
  }))

const relative = (ours: number | null | undefined, theirs: number) =>
  theirs === 0 ? Math.abs(ours ?? NaN) : Math.abs((ours ?? NaN) / theirs - 1)
// A p value matches when it agrees to 1e-6 relative, or to 1e-9 absolute near 0.
const pError = (ours: number | null | undefined, theirs: number) =>
  Math.min(relative(ours, theirs), Math.abs((ours ?? NaN) - theirs) * 1e3)

const caseNamed = (name: string) => fixture.cases.find((c) => c.name === name) as Case

function expectNoNonFinite(result: MixedModelResult) {
  const walk = (x: unknown): void => {
    if (typeof x === 'number') expect(Number.isFinite(x)).toBe(true)
    else if (x !== null && typeof x === 'object') Object.values(x).forEach(walk)
  }
  walk(result)
}

describe('the mixed model against lme4, lmerTest and emmeans', () => {
  for (const c of fixture.cases) {
    describe(c.name, () => {
      const result = mixedModel(ratingsOf(c), c.recipes)

      it('fits the model R fitted', () => {
        expect(result.reason).toBeNull()
        expect(result.terms.includes('player:recipe')).toBe(c.repeats)
      })

      it('gives VarCorr’s variance components and REMLcrit', () => {
        const v = result.variance
        expect(v.reason).toBeNull()
        // On the boundary R reports exactly 0, and so must we.
        if (c.variance.player === 0) expect(v.player).toBe(0)
        else expect(relative(v.player, c.variance.player)).toBeLessThan(TOL)
        if (c.variance.playerRecipe === null) expect(v.playerRecipe).toBeNull()
        else expect(relative(v.playerRecipe, c.variance.playerRecipe)).toBeLessThan(TOL)
        expect(relative(v.residual, c.variance.residual)).toBeLessThan(TOL)
        expect(relative(v.remlCriterion, c.remlCrit)).toBeLessThan(1e-10)
      })

      it('gives anova()’s type III F test with Satterthwaite df', () => {
        const t = result.recipeTest
        expect(t.reason).toBeNull()
        expect(t.numDf).toBe(c.anova.numDf)
        expect(relative(t.f, c.anova.F)).toBeLessThan(TOL)
        expect(relative(t.denDf, c.anova.denDf)).toBeLessThan(TOL)
        expect(pError(t.p, c.anova.p)).toBeLessThan(1e-6)
      })

      it('gives emmeans’ recipe means with SE, df and 95% CI', () => {
        expect(result.means.map((m) => m.recipe)).toEqual(c.emmeans.map((m) => m.recipe))
        c.emmeans.forEach((theirs, j) => {
          const ours = result.means[j]
          expect(ours.reason).toBeNull()
          expect(relative(ours.estimate, theirs.estimate)).toBeLessThan(TOL)
          expect(relative(ours.se, theirs.se)).toBeLessThan(TOL)
          expect(relative(ours.df, theirs.df)).toBeLessThan(TOL)
          expect(relative(ours.ci?.lower, theirs.lower)).toBeLessThan(TOL)
          expect(relative(ours.ci?.upper, theirs.upper)).toBeLessThan(TOL)
        })
      })

      it('gives pairs() with Tukey and unadjusted p', () => {
        expect(result.contrasts.map((p) => `${p.recipeA} - ${p.recipeB}`)).toEqual(
          c.pairsTukey.map((p) => p.contrast),
        )
        c.pairsTukey.forEach((tukey, i) => {
          const none = c.pairsNone[i]
          const ours = result.contrasts[i]
          expect(relative(ours.estimate, tukey.estimate)).toBeLessThan(TOL)
          expect(relative(ours.se, tukey.se)).toBeLessThan(TOL)
          expect(relative(ours.df, tukey.df)).toBeLessThan(TOL)
          expect(relative(ours.t, tukey.t)).toBeLessThan(TOL)
          expect(pError(ours.p, none.p as number)).toBeLessThan(1e-6)
          if (tukey.p === null) {
            // Below 2 df R's ptukey gives NaN; we give null with the reason.
            expect(ours.pTukey).toBeNull()
            expect(ours.reason).toBe('fewer than 2 degrees of freedom')
          } else {
            expect(ours.reason).toBeNull()
            expect(pError(ours.pTukey, tukey.p)).toBeLessThan(1e-6)
          }
        })
      })
    })
  }
})

describe('the mixed model’s own rules', () => {
  const balanced = caseNamed('balanced with repeats')
  const noRepeats = caseNamed('no repeats')

  it('recovers the ANOVA estimates exactly in a balanced panel', () => {
    // Common practice (balanced two-way random model with repeats): REML equals the ANOVA
    // estimators, residual = mean square within cells, and the contrast df are those of the
    // player × recipe mean square, (players − 1)(recipes − 1) = 11 · 3 = 33. R's own figures
    // carry the noise of numerical derivatives (32.99999999), so the exact value is the check here.
    const result = mixedModel(ratingsOf(balanced), balanced.recipes)
    let ss = 0
    const cells = new Map<string, number[]>()
    for (const r of ratingsOf(balanced)) {
      const key = `${r.player}|${r.recipe}`
      cells.set(key, [...(cells.get(key) ?? []), r.value])
    }
    for (const values of cells.values()) {
      const mean = values.reduce((a, b) => a + b, 0) / values.length
      for (const v of values) ss += (v - mean) ** 2
    }
    expect(
      relative(result.variance.residual, ss / (balanced.ratings.length - cells.size)),
    ).toBeLessThan(1e-12)
    for (const pair of result.contrasts)
      expect(Math.abs((pair.df as number) - 33)).toBeLessThan(1e-9)
    expect(Math.abs((result.recipeTest.denDf as number) - 33)).toBeLessThan(1e-9)
  })

  it('lists a recipe nobody rated with a reason and leaves the fit unchanged', () => {
    const base = mixedModel(ratingsOf(balanced), balanced.recipes)
    const withUnrated = mixedModel(ratingsOf(balanced), [...balanced.recipes, 'r9'])
    const unrated = withUnrated.means.find((m) => m.recipe === 'r9')
    expect(unrated).toMatchObject({ n: 0, estimate: null, se: null, reason: 'nobody rated it' })
    const pairs = withUnrated.contrasts.filter((p) => p.recipeB === 'r9')
    expect(pairs).toHaveLength(4)
    for (const p of pairs) expect(p).toMatchObject({ estimate: null, reason: 'nobody rated it' })
    expect(withUnrated.variance).toEqual(base.variance)
    expect(withUnrated.recipeTest).toEqual(base.recipeTest)
    const rated = withUnrated.contrasts.filter((p) => p.recipeB !== 'r9')
    expect(rated).toEqual(base.contrasts)
  })

  it('follows the recipe order it is given', () => {
    const reversed = [...noRepeats.recipes].reverse()
    const forward = mixedModel(ratingsOf(noRepeats), noRepeats.recipes)
    const backward = mixedModel(ratingsOf(noRepeats), reversed)
    expect(backward.means.map((m) => m.recipe)).toEqual(reversed)
    const first = backward.contrasts[0]
    expect([first.recipeA, first.recipeB]).toEqual(['r5', 'r4'])
    const same = forward.contrasts.find((p) => p.recipeA === 'r4' && p.recipeB === 'r5')
    expect(relative(first.estimate, -(same?.estimate as number))).toBeLessThan(1e-9)
    expect(relative(first.pTukey, same?.pTukey as number)).toBeLessThan(1e-9)
  })

  it('uses the model without player:recipe when no cell was rated twice', () => {
    const result = mixedModel(ratingsOf(noRepeats), noRepeats.recipes)
    expect(result.terms).toEqual(['player'])
    expect(result.variance.playerRecipe).toBeNull()
  })

  it('takes numeric ids as well as strings', () => {
    const numeric = ratingsOf(noRepeats).map((r) => ({
      player: Number(String(r.player).slice(1)),
      recipe: Number(String(r.recipe).slice(1)),
      value: r.value,
    }))
    const a = mixedModel(ratingsOf(noRepeats), noRepeats.recipes)
    const b = mixedModel(numeric, [1, 2, 3, 4, 5])
    expect(b.variance).toEqual(a.variance)
  })
})

describe('panels the model cannot fit', () => {
  const rating = (player: string, recipe: string, value: number) => ({ player, recipe, value })

  it('says nobody rated the attribute when there are no ratings', () => {
    const result = mixedModel([], ['a', 'b'])
    expect(result.reason).toBe('nobody rated this attribute')
    expect(result.means.map((m) => m.reason)).toEqual(['nobody rated it', 'nobody rated it'])
    expectNoNonFinite(result)
  })

  it('needs two players', () => {
    const result = mixedModel(
      [rating('p1', 'a', 40), rating('p1', 'b', 60), rating('p1', 'a', 45)],
      ['a', 'b'],
    )
    expect(result.reason).toBe('fewer than two players')
    expect(result.means.every((m) => m.estimate === null)).toBe(true)
    expectNoNonFinite(result)
  })

  it('fits one recipe but has no recipe test or pairs', () => {
    const result = mixedModel(
      [
        rating('p1', 'a', 40),
        rating('p1', 'a', 44),
        rating('p2', 'a', 61),
        rating('p2', 'a', 57),
        rating('p3', 'a', 50),
      ],
      ['a'],
    )
    expect(result.recipeTest.reason).toBe('fewer than two recipes')
    expect(result.contrasts).toEqual([])
    expect(result.means[0].estimate).not.toBeNull()
    expectNoNonFinite(result)
  })

  it('says there is no variance when every rating is the same', () => {
    const same = ['p1', 'p2', 'p3'].flatMap((p) => [rating(p, 'a', 50), rating(p, 'b', 50)])
    const result = mixedModel(same, ['a', 'b'])
    expect(result.reason).toBe('no variance')
    expect(result.means.map((m) => m.estimate)).toEqual([50, 50])
    expect(result.means.every((m) => m.se === null && m.reason === 'no variance')).toBe(true)
    expectNoNonFinite(result)
  })

  it('gives a reason, not Infinity, when the ratings fit players and recipes exactly', () => {
    // value = recipe effect + player offset, no noise: the residual variance is 0 at the limit.
    const exact = ['p1', 'p2', 'p3', 'p4'].flatMap((p, i) =>
      ['a', 'b', 'c'].map((r, j) => rating(p, r, 40 + 5 * i + 3 * j)),
    )
    const result = mixedModel(exact, ['a', 'b', 'c'])
    expect(result.reason).not.toBeNull()
    expectNoNonFinite(result)
  })

  it('gives a reason when repeats agree exactly and nothing is left for the residual', () => {
    const twice = ['p1', 'p2', 'p3'].flatMap((p, i) =>
      ['a', 'b'].flatMap((r, j) => {
        const v = 30 + 7 * i + 11 * j + ((i * j) % 3)
        return [rating(p, r, v), rating(p, r, v)]
      }),
    )
    const result = mixedModel(twice, ['a', 'b'])
    expect(result.reason).not.toBeNull()
    expectNoNonFinite(result)
  })

  it('gives a reason when every player rated once', () => {
    const result = mixedModel([rating('p1', 'a', 40), rating('p2', 'b', 60)], ['a', 'b'])
    expect(result.reason).toBe('too few ratings for the model')
    expectNoNonFinite(result)
  })

  it('refuses non-finite ratings and recipes it was not given', () => {
    expect(() => mixedModel([rating('p1', 'a', NaN)], ['a'])).toThrow(RangeError)
    expect(() => mixedModel([rating('p1', 'a', Infinity)], ['a'])).toThrow(/finite/)
    expect(() => mixedModel([rating('p1', 'z', 50)], ['a'])).toThrow(/not listed/)
    expect(() => mixedModel([], ['a', 'a'])).toThrow(/listed twice/)
  })
})
