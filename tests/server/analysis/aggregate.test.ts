import { describe, expect, it } from 'vitest'
import {
  aggregateRatings,
  completeCases,
  recipeColumn,
  type Rating,
} from '../../../server/analysis/index.ts'

const rating = (
  player: string,
  recipe: string,
  value: number,
  attribute = 'brightness',
): Rating => ({
  player,
  recipe,
  attribute,
  value,
})

describe('aggregateRatings', () => {
  it('averages clips and repeats per player, recipe and attribute', () => {
    const data = aggregateRatings([
      rating('p1', 'A', 40),
      rating('p1', 'A', 50),
      rating('p1', 'A', 60),
      rating('p1', 'B', 70),
      rating('p1', 'A', 10, 'warmth'),
    ])
    expect(data.players).toEqual(['p1'])
    expect(data.recipes).toEqual(['A', 'B'])
    expect(data.attributes).toEqual(['brightness', 'warmth'])
    expect(data.tables[0].means).toEqual([[50, 70]])
    expect(data.tables[0].counts).toEqual([[3, 1]])
    expect(data.tables[1].means).toEqual([[10, null]])
  })

  it('keeps a listed recipe nobody rated, with no data', () => {
    const data = aggregateRatings([rating('p1', 'A', 40)], { recipes: ['A', 'B'] })
    expect(data.recipes).toEqual(['A', 'B'])
    expect(data.tables[0].means).toEqual([[40, null]])
    expect(recipeColumn(data.tables[0], 1)).toEqual([])
  })

  it('leaves out values that are not finite numbers and counts them', () => {
    const data = aggregateRatings([
      rating('p1', 'A', 40),
      rating('p1', 'A', Number.NaN),
      { ...rating('p1', 'A', 0), value: null as unknown as number },
    ])
    expect(data.ignored).toBe(2)
    expect(data.tables[0].means).toEqual([[40]])
  })

  it('uses complete cases for a pair and counts the players dropped', () => {
    const data = aggregateRatings([
      rating('p1', 'A', 40),
      rating('p1', 'B', 60),
      rating('p2', 'A', 45),
      rating('p3', 'B', 55),
      rating('p4', 'C', 50),
    ])
    const pair = completeCases(data.tables[0], [0, 1])
    expect(pair.values).toEqual([[40, 60]])
    expect(pair.players).toEqual([0])
    // p2 and p3 rated one of the two; p4 rated neither but is on this attribute's panel.
    expect(pair.dropped).toBe(3)
  })

  it('returns empty tables for no data', () => {
    expect(aggregateRatings([])).toMatchObject({ players: [], recipes: [], tables: [] })
  })
})
