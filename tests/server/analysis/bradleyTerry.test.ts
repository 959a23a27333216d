import { describe, expect, it } from 'vitest'
import { bradleyTerry, winsMatrix } from '../../../server/analysis/index.ts'

// Journal cross-citations, Agresti (2002) Categorical Data Analysis, 2nd ed., p. 448:
// wins[i][j] = times journal i was cited by journal j ("i beat j").
const journals = ['Biometrika', 'Comm Statist', 'JASA', 'JRSS-B']
const citations = [
  [0, 730, 498, 221],
  [33, 0, 68, 17],
  [320, 813, 0, 142],
  [284, 276, 325, 0],
]

describe('bradleyTerry', () => {
  it('reproduces the journal citation abilities and standard errors', () => {
    const r = bradleyTerry(journals, citations)
    expect(r.reason).toBeNull()
    expect(r.converged).toBe(true)
    const [bio, cs, jasa, rssb] = r.abilities
    // Source: Agresti (2002) p. 448 / BradleyTerry2 reference output, Biometrika fixed at 0:
    // Comm Statist −2.9490725, JASA −0.4795698, JRSS-B 0.2689541; s.e. 0.1025, 0.0606, 0.0708.
    expect(bio.logAbility).toBe(0)
    expect(bio.se).toBe(0)
    expect(cs.logAbility).toBeCloseTo(-2.9490725, 6)
    expect(jasa.logAbility).toBeCloseTo(-0.4795698, 6)
    expect(rssb.logAbility).toBeCloseTo(0.2689541, 6)
    expect(cs.se).toBeCloseTo(0.1025, 4)
    expect(jasa.se).toBeCloseTo(0.0606, 4)
    expect(rssb.se).toBeCloseTo(0.0708, 4)
  })

  it('gives win probabilities that follow from the abilities', () => {
    const r = bradleyTerry(journals, citations)
    const win = r.winProbability as number[][]
    // Computed from the model: P(JRSS-B over Biometrika) = 1 / (1 + e^(−0.2689541)).
    expect(win[3][0]).toBeCloseTo(1 / (1 + Math.exp(-0.2689541)), 6)
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        expect(win[i][j] + win[j][i]).toBeCloseTo(1, 12)
      }
    }
  })

  it('does not depend on which item is the reference, up to a shift', () => {
    const a = bradleyTerry(journals, citations)
    const b = bradleyTerry(journals, citations, { reference: 2 })
    const shift = a.abilities[2].logAbility as number
    b.abilities.forEach((ability, i) =>
      expect(ability.logAbility).toBeCloseTo((a.abilities[i].logAbility as number) - shift, 6),
    )
  })

  it('builds the wins matrix from single choices', () => {
    const wins = winsMatrix(
      [
        { winner: 'A', loser: 'B' },
        { winner: 'A', loser: 'B' },
        { winner: 'B', loser: 'A' },
        { winner: 'C', loser: 'A' },
      ],
      ['A', 'B', 'C'],
    )
    expect(wins).toEqual([
      [0, 2, 0],
      [1, 0, 0],
      [1, 0, 0],
    ])
  })

  it('gives two items with equal wins equal abilities', () => {
    // Computed: 5 wins each way means the MLE puts both at the same ability.
    const r = bradleyTerry(
      ['A', 'B'],
      [
        [0, 5],
        [5, 0],
      ],
    )
    expect(r.abilities[1].logAbility).toBeCloseTo(0, 9)
    expect(r.winProbability?.[0][1]).toBeCloseTo(0.5, 9)
    // Computed from the information n·p·(1 − p) = 10 · 0.25: s.e. = 1/√2.5.
    expect(r.abilities[1].se).toBeCloseTo(1 / Math.sqrt(2.5), 9)
  })

  it('refuses to estimate when a recipe won every comparison', () => {
    const r = bradleyTerry(
      ['A', 'B', 'C'],
      [
        [0, 4, 3],
        [0, 0, 2],
        [0, 1, 0],
      ],
    )
    // Hunter (2004), Assumption 1: with A unbeaten the likelihood has no finite maximum.
    expect(r.reason).toBe('some recipes won every comparison with the rest')
    // No placeholder numbers: no abilities, no 0.5 win chances.
    expect(r.abilities.map((a) => [a.logAbility, a.se])).toEqual([
      [null, null],
      [null, null],
      [null, null],
    ])
    expect(r.winProbability).toBeNull()
    expect(r.abilities.map((a) => a.wins)).toEqual([7, 2, 1])
  })

  it('gives its own reason with no items, or an item never compared', () => {
    expect(bradleyTerry([], []).reason).toBe('fewer than two recipes')
    const r = bradleyTerry(
      ['A', 'B', 'C'],
      [
        [0, 2, 0],
        [3, 0, 0],
        [0, 0, 0],
      ],
    )
    expect(r.reason).toBe('a recipe was never compared')
    expect(r.winProbability).toBeNull()
  })

  it('refuses wins that are not a square matrix of whole counts', () => {
    expect(() => bradleyTerry(['A', 'B'], [[0, 1]])).toThrow(/square matrix/)
    expect(() =>
      bradleyTerry(
        ['A', 'B'],
        [
          [0, 1.5],
          [1, 0],
        ],
      ),
    ).toThrow(/whole numbers/)
    expect(() =>
      bradleyTerry(
        ['A', 'B'],
        [
          [0, NaN],
          [1, 0],
        ],
      ),
    ).toThrow(/whole numbers/)
    expect(() =>
      bradleyTerry(
        ['A', 'B'],
        [
          [0, -1],
          [1, 0],
        ],
      ),
    ).toThrow(/whole numbers/)
    expect(() =>
      bradleyTerry(
        ['A', 'B'],
        [
          [0, 1],
          [1, 0],
        ],
        { reference: 2 },
      ),
    ).toThrow(/reference/)
  })

  it('says when the fit does not converge, with no numbers', () => {
    const r = bradleyTerry(
      ['A', 'B', 'C'],
      [
        [0, 40, 1],
        [1, 0, 30],
        [20, 1, 0],
      ],
      { maxIterations: 2 },
    )
    expect(r.reason).toBe('did not converge')
    expect(r.abilities[1].logAbility).toBeNull()
  })
})
