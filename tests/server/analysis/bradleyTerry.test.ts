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
    // Computed from the model: P(JRSS-B over Biometrika) = 1 / (1 + e^(−0.2689541)).
    expect(r.winProbability[3][0]).toBeCloseTo(1 / (1 + Math.exp(-0.2689541)), 6)
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        expect(r.winProbability[i][j] + r.winProbability[j][i]).toBeCloseTo(1, 12)
      }
    }
  })

  it('does not depend on which item is the reference, up to a shift', () => {
    const a = bradleyTerry(journals, citations)
    const b = bradleyTerry(journals, citations, { reference: 2 })
    const shift = a.abilities[2].logAbility
    b.abilities.forEach((ability, i) =>
      expect(ability.logAbility).toBeCloseTo(a.abilities[i].logAbility - shift, 6),
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
    expect(r.winProbability[0][1]).toBeCloseTo(0.5, 9)
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
    expect(r.reason).toBe('no finite estimate')
    expect(r.abilities.every((a) => Number.isFinite(a.logAbility))).toBe(true)
  })

  it('says "not enough data" with no comparisons or an item never compared', () => {
    expect(bradleyTerry([], []).reason).toBe('not enough data')
    const r = bradleyTerry(
      ['A', 'B', 'C'],
      [
        [0, 2, 0],
        [3, 0, 0],
        [0, 0, 0],
      ],
    )
    expect(r.reason).toBe('not enough data')
  })
})
