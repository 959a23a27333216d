import { describe, expect, it } from 'vitest'
import { mixedModel } from '../../../server/analysis/linearMixed.ts'
import fixture from './fixtures/linearMixed.json'

// Against lme4 + lmerTest + emmeans (R 4.2.2; fixtures/linearMixed.R beside the JSON): lmer(REML),
// VarCorr, REMLcrit, anova(type = "III", ddf = "Satterthwaite"), emmeans(~ recipe,
// lmer.df = "satterthwaite") and pairs(adjust = "tukey" / "none"). The REML criterion agrees
// to 1e-12, but the likelihood is flat near its optimum and lme4's optimiser stops earlier, so
// the variance components (and what follows from them) agree to about 1e-5; each figure has the
// tolerance it reaches, stated below. jStat's studentized range resolves p to about 1e-10, and
// t and df carry the 1e-5 above, so Tukey p is compared in absolute terms (1e-7).

interface Case {
  name: string
  repeated: boolean
  data: { player: string; recipe: string; value: number }[]
  recipes: string[]
  variance: { player: number; playerRecipe?: number | Record<string, never>; residual: number }
  reml: number
  f: { f: number; numDf: number; denDf: number; p: number }
  means: {
    recipe: string
    estimate: number
    se: number
    df: number
    lower: number
    upper: number
  }[]
  contrasts: {
    contrast: string
    estimate: number
    se: number
    df: number
    t: number
    p: number
    pNone: number
  }[]
}

const cases = fixture as unknown as Case[]
const relative = (ours: number | null | undefined, theirs: number) =>
  Math.abs((ours ?? NaN) - theirs) / Math.max(Math.abs(theirs), 1e-300)
const worst: Record<string, number> = {}
const note = (figure: string, error: number) =>
  (worst[figure] = Math.max(worst[figure] ?? 0, error))

describe('the mixed model against lme4, lmerTest and emmeans', () => {
  for (const c of cases) {
    it(`matches R on ${c.name}`, () => {
      const result = mixedModel(c.data, c.recipes)
      expect(result.reason).toBeNull()
      expect(result.formula.includes('player:recipe')).toBe(c.repeated)
      note('variance player', relative(result.variance?.player, c.variance.player))
      note('variance residual', relative(result.variance?.residual, c.variance.residual))
      if (c.repeated)
        note(
          'variance player:recipe',
          relative(result.variance?.playerRecipe, c.variance.playerRecipe as number),
        )
      note('REML criterion', relative(result.reml, c.reml))
      note('F', relative(result.test?.f, c.f.f))
      expect(result.test?.numDf).toBe(c.f.numDf)
      note('F denominator df', relative(result.test?.denDf, c.f.denDf))
      note('F p', relative(result.test?.p, c.f.p))
      c.means.forEach((m, i) => {
        const ours = result.means[i]
        expect(ours.recipe).toBe(m.recipe)
        note('mean', relative(ours.estimate, m.estimate))
        note('mean SE', relative(ours.se, m.se))
        note('mean df', relative(ours.df, m.df))
        note(
          'mean CI',
          Math.max(relative(ours.ci?.lower, m.lower), relative(ours.ci?.upper, m.upper)),
        )
      })
      c.contrasts.forEach((k, i) => {
        const ours = result.contrasts[i]
        // emmeans names "r1 - r2" (first − second); ours is second − first, as the pair table.
        expect(`${ours.first} - ${ours.second}`).toBe(k.contrast)
        note('contrast', relative(-ours.estimate, k.estimate))
        note('contrast SE', relative(ours.se, k.se))
        note('contrast df', relative(ours.df, k.df))
        note('contrast t', relative(-ours.t, k.t))
        expect(Math.abs(ours.p - k.p), 'Tukey p').toBeLessThan(1e-7)
        note('contrast p (none)', relative(ours.pUnadjusted, k.pNone))
      })
    })
  }

  it('stays within each figure’s tolerance of R', () => {
    const tolerance: Record<string, number> = {
      'REML criterion': 1e-12,
      mean: 1e-8,
      contrast: 1e-7,
      'mean CI': 1e-6,
      'mean SE': 5e-6,
      'contrast SE': 5e-6,
      'contrast t': 5e-6,
      F: 5e-6,
      'variance player': 5e-5,
      'variance residual': 5e-5,
      'variance player:recipe': 5e-5,
      'mean df': 5e-5,
      'contrast df': 5e-5,
      'contrast p (none)': 1e-3,
      'F denominator df': 5e-5,
      'F p': 5e-4,
    }
    if (process.env.SHOW_WORST) console.table(worst)
    for (const [figure, error] of Object.entries(worst)) {
      if (figure === 'contrast p (Tukey)') continue
      expect(error, figure).toBeLessThan(tolerance[figure])
    }
  })
})

describe('the mixed model on bad input', () => {
  it('answers with a reason, never NaN', () => {
    expect(mixedModel([], ['A', 'B']).reason).toBe('nobody rated this attribute')
    const one = [
      { player: 'p', recipe: 'A', value: 40 },
      { player: 'p', recipe: 'B', value: 60 },
    ]
    expect(mixedModel(one, ['A', 'B']).reason).toBe('only one player rated it')
    const same = ['p1', 'p2', 'p3'].flatMap((player) =>
      ['A', 'B'].map((recipe) => ({ player, recipe, value: 50 })),
    )
    expect(mixedModel(same, ['A', 'B']).reason).toBe('no variance')
    const single = ['p1', 'p2', 'p3'].map((player, i) => ({ player, recipe: 'A', value: 40 + i }))
    expect(mixedModel(single, ['A', 'B']).reason).toBe('fewer than two recipes')
    expect(() => mixedModel([{ player: 'p', recipe: 'A', value: NaN }], ['A'])).toThrow(/finite/)
  })
})

describe('a singular fit', () => {
  it('says so when a variance sits at 0, as lme4 warns', () => {
    // Two players who agree exactly up to repeat noise: no spread between players to estimate.
    const ratings = ['p1', 'p2'].flatMap((player) =>
      ['A', 'B', 'C'].flatMap((recipe, j) =>
        [0, 1].map((k) => ({ player, recipe, value: 40 + 10 * j + (k ? 1 : -1) })),
      ),
    )
    const fit = mixedModel(ratings, ['A', 'B', 'C'])
    expect(fit.singular).toBe(true)
    expect(fit.variance?.player).toBeLessThan(1e-6)
  })
})
