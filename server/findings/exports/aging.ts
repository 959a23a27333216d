import { hi, lo, type ExportTable } from './csv'

// The time trend of an aging study: each recipe's change from the first time point.

export const aging: ExportTable = {
  header: [
    'attribute',
    'recipe',
    'from',
    'to',
    'n',
    'difference_later_minus_first',
    'ci_lower',
    'ci_upper',
    't',
    'df',
    'p',
    'holm_p',
    'wilcoxon_p',
    'dz',
    'sentence',
    'reason',
  ],
  rows: (f) =>
    (f.aging?.attributes ?? []).flatMap((a) =>
      a.changes.map((c) => [
        a.name,
        c.name,
        c.from,
        c.to,
        c.n,
        c.difference,
        lo(c.ci),
        hi(c.ci),
        c.t,
        c.df,
        c.p,
        c.holmP,
        c.wilcoxonP,
        c.dz,
        c.sentence,
        c.reason,
      ]),
    ),
}
