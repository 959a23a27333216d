import { hi, lo, type ExportTable } from './csv'

// The mixed model per attribute: its estimated means with the model's test, and its pairs.

export const mixed: ExportTable = {
  header: [
    'attribute',
    'formula',
    'recipe',
    'estimate',
    'se',
    'df',
    'ci_lower',
    'ci_upper',
    'f',
    'num_df',
    'den_df',
    'p',
    'var_player',
    'var_player_recipe',
    'var_residual',
    'reml',
    'singular',
    'reason',
  ],
  rows: (f, name) =>
    f.attributes.flatMap(({ name: attribute, mixed: m }) =>
      m.means.map((e) => [
        attribute,
        m.formula,
        name(e.recipe),
        e.estimate,
        e.se,
        e.df,
        lo(e.ci),
        hi(e.ci),
        m.test?.f,
        m.test?.numDf,
        m.test?.denDf,
        m.test?.p,
        m.variance?.player,
        m.variance?.playerRecipe,
        m.variance?.residual,
        m.reml,
        m.singular,
        m.reason,
      ]),
    ),
}

export const contrasts: ExportTable = {
  header: [
    'attribute',
    'first',
    'second',
    'difference_second_minus_first',
    'se',
    'df',
    't',
    'p_tukey',
    'p_unadjusted',
  ],
  rows: (f, name) =>
    f.attributes.flatMap(({ name: attribute, mixed: m }) =>
      m.contrasts.map((c) => [
        attribute,
        name(c.first),
        name(c.second),
        c.estimate,
        c.se,
        c.df,
        c.t,
        c.p,
        c.pUnadjusted,
      ]),
    ),
}
