import { adjustmentOf, hi, lo, type ExportTable } from './csv'

// The attribute rating tables: means per recipe, recipe pairs and the omnibus test per
// attribute, and the clip measures against what players perceived.

export const means: ExportTable = {
  header: ['attribute', 'recipe', 'n', 'mean', 'sd', 'ci_lower', 'ci_upper', 'letters', 'reason'],
  rows: (f) =>
    f.attributes.flatMap((a) =>
      a.recipes.map((r) => [
        a.name,
        r.name,
        r.n,
        r.mean,
        r.sd,
        lo(r.ci),
        hi(r.ci),
        r.letters,
        r.reason,
      ]),
    ),
}

export const pairs: ExportTable = {
  header: [
    'attribute',
    'first',
    'second',
    'n',
    'dropped',
    'difference_second_minus_first',
    'ci_lower',
    'ci_upper',
    't',
    'df',
    'p',
    'p_adjusted',
    'wilcoxon_v',
    'wilcoxon_p',
    'wilcoxon_method',
    'wilcoxon_p_adjusted',
    'adjustment',
    'dz',
    'rank_biserial',
    'sentence',
    'reason',
  ],
  rows: (f, name) =>
    f.attributes.flatMap((a) =>
      a.pairs.map((p) => [
        a.name,
        name(p.first),
        name(p.second),
        p.n,
        p.dropped,
        p.difference,
        lo(p.ci),
        hi(p.ci),
        p.t,
        p.df,
        p.p,
        p.adjustedP,
        p.wilcoxonV,
        p.wilcoxonP,
        p.wilcoxonMethod,
        p.wilcoxonAdjustedP,
        adjustmentOf(f),
        p.dz,
        p.rankBiserial,
        p.sentence,
        p.reason,
      ]),
    ),
}

export const omnibus: ExportTable = {
  header: [
    'attribute',
    'test',
    'n',
    'dropped',
    'recipes',
    'chi_square',
    'df',
    'p',
    'kendall_w',
    'sentence',
    'reason',
  ],
  rows: (f, name) =>
    f.attributes.map(({ name: attribute, omnibus: o }) => [
      attribute,
      o.test,
      o.n,
      o.dropped,
      o.recipes.map(name).join(' | '),
      o.chiSquare,
      o.df,
      o.p,
      o.kendallW,
      o.sentence,
      o.reason,
    ]),
}

/** The interim look of a running session: empty once it has closed. */
export const interim: ExportTable = {
  header: [
    'attribute',
    'complete_players',
    'difference',
    'difference_from',
    'sd_pooled',
    'pairs',
    'alpha_per_pair',
    'target_power',
    'power_now',
    'players_needed',
    'players_more',
    'sentence',
    'reason',
  ],
  rows: (f) =>
    f.attributes.flatMap(({ name, interim: i }) =>
      i
        ? [
            [
              name,
              i.complete,
              i.difference,
              i.differenceSource,
              i.sd,
              i.pairs,
              i.alphaPerPair,
              i.targetPower,
              i.powerNow,
              i.needed,
              i.more,
              i.sentence,
              i.reason,
            ],
          ]
        : [],
    ),
}

export const objective: ExportTable = {
  header: [
    'measure',
    'unit',
    'attribute',
    'n',
    'rho',
    'p',
    'pearson_r',
    'pearson_p',
    'pearson_ci_lower',
    'pearson_ci_upper',
    'reason',
  ],
  rows: (f) =>
    f.objective.map((o) => [
      o.measure,
      o.unit,
      o.name,
      o.n,
      o.rho,
      o.p,
      o.pearsonR,
      o.pearsonP,
      lo(o.pearsonCi),
      hi(o.pearsonCi),
      o.reason,
    ]),
}
