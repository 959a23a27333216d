import ttest from '@stdlib/stats-ttest'
import wilcoxon from '@stdlib/stats-wilcoxon'
import {
  aggregateRatings,
  completeCases,
  computeFindings,
  type Rating,
} from '../../server/analysis'
import { round, timeMedian, type Figure } from './figure'

// A deterministic panel: 1,000 players × 10 recipes × 6 attributes × 2 repeats; the whole
// engine runs on it, the mixed model of every attribute included.
function panel(): Rating[] {
  let s = 12345
  const rand = () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648
  const normal = () => Math.sqrt(-2 * Math.log(rand() + 1e-12)) * Math.cos(2 * Math.PI * rand())
  const ratings: Rating[] = []
  for (let p = 0; p < 1000; p++) {
    const leniency = normal() * 8
    for (let r = 0; r < 10; r++)
      for (let a = 0; a < 6; a++)
        for (let rep = 0; rep < 2; rep++)
          ratings.push({
            player: `p${p}`,
            recipe: `r${r}`,
            attribute: `a${a}`,
            value: Math.round(
              Math.min(100, Math.max(0, 50 + leniency + (r - 4.5) * a + normal() * 10)),
            ),
          })
  }
  return ratings
}

export function findingsFigures(): Figure[] {
  const ratings = panel()
  const ours = timeMedian(5, () => computeFindings({ ratings }))

  // The same paired tests through the reference library, for comparison.
  const reference = timeMedian(3, () => {
    const table = aggregateRatings(ratings)
    const n = table.recipes.length
    for (const attribute of table.tables)
      for (let i = 0; i < n; i++)
        for (let j = i + 1; j < n; j++) {
          const { values } = completeCases(attribute, [i, j])
          const x = values.map((v) => v[0])
          const y = values.map((v) => v[1])
          ttest(x, y)
          wilcoxon(x, y)
        }
  })
  return [
    {
      name: 'findings statistics incl. mixed models, 1000 players x 10 recipes x 6 attributes x 2 repeats',
      value: round(ours),
      unit: 'ms',
      target: '< 250',
      better: 'lower',
    },
    {
      name: 'same paired tests through @stdlib (reference)',
      value: round(reference),
      unit: 'ms',
      target: 'for comparison',
      better: 'lower',
    },
  ]
}
