import { describe, expect, it } from 'vitest'
import { holm } from '../../../server/analysis/index.ts'

describe('holm', () => {
  it('adjusts a sorted family', () => {
    // Computed by Holm (1979)'s rule, as R p.adjust(c(.01,.02,.03,.04,.05), "holm").
    const adjusted = holm([0.01, 0.02, 0.03, 0.04, 0.05])
    ;[0.05, 0.08, 0.09, 0.09, 0.09].forEach((v, i) => expect(adjusted[i]).toBeCloseTo(v, 12))
  })

  it('adjusts an unsorted family and returns it in input order', () => {
    // Computed by Holm's rule: sorted 0.005·4, 0.01·3, 0.03·2, then max(0.06, 0.04·1).
    const adjusted = holm([0.04, 0.01, 0.03, 0.005])
    ;[0.06, 0.03, 0.06, 0.02].forEach((v, i) => expect(adjusted[i]).toBeCloseTo(v, 12))
  })

  it('caps at 1 and skips tests that could not be run', () => {
    // As R's p.adjust with NA: the family size counts only the tests that exist.
    const adjusted = holm([0.6, null, 0.02])
    expect(adjusted[1]).toBeNull()
    expect(adjusted[2]).toBeCloseTo(0.04, 12)
    expect(adjusted[0]).toBeCloseTo(0.6, 12)
    expect(holm([0.5, 0.7, 0.9])).toEqual([1, 1, 1])
    expect(holm([])).toEqual([])
  })
})
