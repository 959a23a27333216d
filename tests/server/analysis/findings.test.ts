import { describe, expect, it } from 'vitest'
import { roundingTimes } from './roundingTimes.ts'
import {
  computeFindings,
  holm,
  wilcoxonSignedRank,
  type Rating,
} from '../../../server/analysis/index.ts'
import { seeded } from './random.ts'

const recipes = [
  { id: 'A', name: 'Recipe A' },
  { id: 'B', name: 'Recipe B' },
  { id: 'C', name: 'Recipe C' },
]
const brightness = { id: 'brightness', name: 'brightness', higher: 'brighter' }

/** Each player hears each clip twice; the two answers straddle the value by ±spread. */
function ratingsFrom(rows: number[][], attribute = 'brightness', spread = 0.5): Rating[] {
  const out: Rating[] = []
  rows.forEach((row, p) =>
    row.forEach((value, r) => {
      for (const sign of [-1, 1]) {
        out.push({
          player: `p${p + 1}`,
          recipe: recipes[r].id,
          attribute,
          value: value + sign * spread,
        })
      }
    }),
  )
  return out
}

/** Findings must never hold NaN: every number is finite, ±Infinity-free, or null. */
function expectNoNaN(value: unknown, path = 'findings'): void {
  if (typeof value === 'number') expect(Number.isNaN(value), path).toBe(false)
  else if (Array.isArray(value)) value.forEach((v, i) => expectNoNaN(v, `${path}[${i}]`))
  else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) expectNoNaN(v, `${path}.${k}`)
  }
}

// Student's sleep data (R datasets `sleep`), shifted onto the rating scale.
const sleep1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]
const sleep2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]

describe('computeFindings on reference data', () => {
  const rows = sleep1.map((v, i) => [50 + v, 50 + sleep2[i]])
  const findings = computeFindings({
    ratings: ratingsFrom(rows),
    recipes: recipes.slice(0, 2),
    attributes: [brightness],
  })
  const [attribute] = findings.attributes
  const [pair] = attribute.pairs

  it('averages the repeats and runs the paired t on player means', () => {
    // Source: R t.test.Rd on `sleep` (B − A is group 2 − group 1): t = 4.0621, df = 9,
    // p = 0.002833, 95% CI 0.7001142 to 2.4598858, mean difference 1.58.
    expect(pair).toMatchObject({ first: 'A', second: 'B', n: 10, dropped: 0, df: 9 })
    expect(pair.difference).toBeCloseTo(1.58, 10)
    expect(pair.t).toBeCloseTo(4.0621, 4)
    expect(pair.p).toBeCloseTo(0.002833, 6)
    expect(pair.ci?.lower).toBeCloseTo(0.7001142, 6)
    expect(pair.ci?.upper).toBeCloseTo(2.4598858, 6)
    // A family of one pair: Holm leaves p as it is.
    expect(pair.adjustedP).toBe(pair.p)
  })

  it('writes the plain sentence with the higher recipe first', () => {
    expect(pair.sentence).toBe(
      'Recipe B is rated brighter than Recipe A by 1.6 points (95% CI 0.7 to 2.5), Holm p = 0.003.',
    )
  })

  it('reports the Wilcoxon test and effect sizes on the same differences', () => {
    const w = wilcoxonSignedRank(sleep2, sleep1)
    expect(pair.wilcoxonV).toBe(w.V)
    expect(pair.wilcoxonP).toBeCloseTo(w.p as number, 12)
    // A zero difference (patient 5) rules out the exact test, as in R.
    expect(pair.wilcoxonMethod).toBe('normal')
    expect(pair.dz).toBeCloseTo(1.58 / 1.229995, 5)
    expect(pair.rankBiserial).toBeCloseTo(w.rankBiserial as number, 12)
  })

  it('gives recipe means with 95% CIs and skips the omnibus for two recipes', () => {
    expect(attribute.recipes.map((r) => r.n)).toEqual([10, 10])
    expect(attribute.recipes[0].mean).toBeCloseTo(50.75, 10)
    expect(attribute.recipes[1].mean).toBeCloseTo(52.33, 10)
    expect(attribute.omnibus.reason).toBe('fewer than three recipes')
  })
})

describe('computeFindings with three recipes', () => {
  // RoundingTimes (Hollander & Wolfe 1973 p. 140; full matrix in R's friedman.test.Rd), ×10 so
  // it sits on the rating scale; scaling does not change within-player ranks.
  const scaled = roundingTimes.map((row) => row.map((v) => Math.round(v * 100) / 10))
  const findings = computeFindings({
    ratings: ratingsFrom(scaled, 'brightness', 0),
    recipes,
    attributes: [brightness],
  })
  const [attribute] = findings.attributes

  it('runs the Friedman omnibus with Kendall W', () => {
    // Source: R friedman.test.Rd: chi-squared = 11.143, df = 2, p = 0.003805; W = 0.2532.
    const o = attribute.omnibus
    expect(o.chiSquare).toBeCloseTo(11.143, 3)
    expect(o.p).toBeCloseTo(0.003805, 6)
    expect(o.kendallW).toBeCloseTo(0.2532, 4)
    expect(o.sentence).toBe(
      "Friedman test on brightness: χ²(2) = 11.14, p = 0.004, Kendall's W = 0.25, 22 players.",
    )
  })

  it('Holm-adjusts the three pairs as one family', () => {
    expect(attribute.pairs.map((p) => `${p.first}-${p.second}`)).toEqual(['A-B', 'A-C', 'B-C'])
    const expected = holm(attribute.pairs.map((p) => p.p))
    attribute.pairs.forEach((p, i) => expect(p.adjustedP).toBe(expected[i]))
    const expectedW = holm(attribute.pairs.map((p) => p.wilcoxonP))
    attribute.pairs.forEach((p, i) => expect(p.wilcoxonAdjustedP).toBe(expectedW[i]))
  })

  it('says when a difference is not clear', () => {
    const ab = attribute.pairs[0]
    expect(ab.adjustedP).toBeGreaterThan(0.05)
    expect(
      ab.sentence.startsWith('No clear difference between Recipe A and Recipe B on brightness'),
    ).toBe(true)
  })
})

describe('computeFindings on bad input', () => {
  it('answers "no answers" for no ratings', () => {
    const f = computeFindings({ ratings: [] })
    expect(f).toMatchObject({ players: 0, attributes: [], reason: 'no answers' })
  })

  it('handles a single player without NaN', () => {
    const f = computeFindings({ ratings: ratingsFrom([[40, 60, 50]]), recipes })
    const [a] = f.attributes
    expect(a.pairs.every((p) => p.reason === 'only one player rated both' && p.p === null)).toBe(
      true,
    )
    expect(a.pairs[0].sentence).toBe(
      'No comparison of Recipe A and Recipe B on brightness yet: 1 player rated both, and a test needs two.',
    )
    expect(a.omnibus.reason).toBe('fewer than two players rated every recipe')
    expect(a.omnibus.sentence).toBe(
      'No overall test on brightness: it needs two players who rated every recipe, and 1 did.',
    )
    expect(a.recipes[0]).toMatchObject({
      n: 1,
      mean: 40,
      ci: null,
      reason: 'only one player rated it',
    })
    expectNoNaN(f)
  })

  it('keeps a recipe nobody rated, with reasons, and runs the rest', () => {
    const rows = [
      [40, 60],
      [45, 62],
      [38, 66],
      [50, 58],
    ]
    const f = computeFindings({
      ratings: ratingsFrom(rows),
      recipes: [...recipes, { id: 'D', name: 'Recipe D' }],
    })
    const [a] = f.attributes
    const c = a.recipes.find((r) => r.recipe === 'C')
    expect(c).toMatchObject({ n: 0, mean: null, reason: 'nobody rated it' })
    const ab = a.pairs.find((p) => p.first === 'A' && p.second === 'B')
    expect(ab?.reason).toBeNull()
    const ac = a.pairs.find((p) => p.first === 'A' && p.second === 'C')
    expect(ac).toMatchObject({
      n: 0,
      dropped: 4,
      p: null,
      adjustedP: null,
      reason: 'no player rated both',
    })
    expect(ac?.sentence).toBe('No player has rated both Recipe A and Recipe C on brightness yet.')
    // Holm counts only the pair that could be tested.
    expect(ab?.adjustedP).toBe(ab?.p)
    // Four recipes in the session, two of them rated: the design is not the cause.
    expect(a.omnibus.reason).toBe('fewer than three recipes rated')
    expect(a.omnibus.sentence).toBe(
      'No overall test on brightness: only 2 recipes have been rated on it so far.',
    )
    expectNoNaN(f)
  })

  it('says nobody rated an attribute, not that the session has too few recipes', () => {
    const warmth = { id: 'warmth', name: 'warmth', higher: 'warmer' }
    const f = computeFindings({
      ratings: ratingsFrom([
        [40, 60, 50],
        [45, 62, 52],
      ]),
      recipes,
      attributes: [brightness, warmth],
    })
    const w = f.attributes.find((a) => a.attribute === 'warmth')
    expect(w?.players).toBe(0)
    expect(w?.omnibus.reason).toBe('nobody rated this attribute')
    expect(w?.omnibus.sentence).toBe('Nobody has rated warmth yet: there is nothing to test.')
    expect(w?.recipes.every((r) => r.reason === 'nobody rated it')).toBe(true)
    expect(w?.pairs.every((p) => p.reason === 'no player rated both')).toBe(true)
    // Two recipes in the session: there the pair is the whole test, and says so.
    const two = computeFindings({
      ratings: ratingsFrom([[40, 60]]),
      recipes: recipes.slice(0, 2),
      attributes: [brightness, warmth],
    })
    expect(two.attributes[1].omnibus.reason).toBe('fewer than three recipes')
    expectNoNaN(f)
  })

  it('answers "no variance" when every player gives every recipe the same score', () => {
    const f = computeFindings({
      ratings: ratingsFrom(
        [
          [50, 50, 50],
          [70, 70, 70],
          [30, 30, 30],
        ],
        'brightness',
        0,
      ),
      recipes,
      attributes: [brightness],
    })
    const [a] = f.attributes
    expect(a.pairs.every((p) => p.reason === 'no variance' && p.p === null)).toBe(true)
    expect(a.pairs[0].sentence).toBe(
      'Recipe A and Recipe B are rated the same on brightness by every player.',
    )
    expect(a.omnibus).toMatchObject({ reason: 'no variance', chiSquare: null })
    expectNoNaN(f)
  })

  it('counts players dropped from a pair for missing a recipe', () => {
    const ratings = ratingsFrom([
      [40, 60, 50],
      [45, 62, 51],
      [38, 66, 49],
    ]).filter((r) => !(r.player === 'p3' && r.recipe === 'B'))
    const f = computeFindings({ ratings, recipes })
    const [a] = f.attributes
    expect(a.pairs.find((p) => p.second === 'B')).toMatchObject({ n: 2, dropped: 1 })
    expect(a.omnibus).toMatchObject({ n: 2, dropped: 1 })
  })

  it('leaves excluded players out', () => {
    const ratings = ratingsFrom([
      [40, 60, 50],
      [45, 62, 51],
      [38, 66, 49],
    ])
    const f = computeFindings({ ratings, recipes, excludedPlayers: ['p2'] })
    expect(f.players).toBe(2)
    expect(f.excludedPlayers).toBe(1)
  })
})

describe('computeFindings at full width', () => {
  // Its speed at 1,000 players is a benchmark figure (npm run bench), not a test.
  it('gives every recipe pair of every attribute for 10 recipes × 6 attributes', () => {
    const ratings = syntheticPanel(40, seeded(1))
    const f = computeFindings({ ratings })
    expect(f.attributes).toHaveLength(6)
    expect(f.attributes[0].pairs).toHaveLength(45)
  })
})

function syntheticPanel(players: number, rng: ReturnType<typeof seeded>): Rating[] {
  const ratings: Rating[] = []
  for (let p = 0; p < players; p++) {
    const leniency = rng.normal(0, 8)
    for (let r = 0; r < 10; r++) {
      for (let a = 0; a < 6; a++) {
        for (let repeat = 0; repeat < 2; repeat++) {
          const value = 50 + leniency + (r - 4.5) * a + rng.normal(0, 10)
          ratings.push({
            player: `p${p}`,
            recipe: `r${r}`,
            attribute: `a${a}`,
            value: Math.round(Math.min(100, Math.max(0, value))),
          })
        }
      }
    }
  }
  return ratings
}
