import { adjustmentOf, hi, lo, type ExportTable } from './csv'

// The pair tables: preference and "which has more" counts with their sign tests, and the
// preference scale.

export const preferences: ExportTable = {
  header: [
    'question',
    'first',
    'second',
    'first_chosen',
    'second_chosen',
    'no_preference',
    'share_first',
    'ci_lower',
    'ci_upper',
    'p',
    'p_adjusted',
    'adjustment',
    'sentence',
  ],
  rows: (f, name) => {
    const pref = f.preferences
    if (!pref) return []
    return [
      ...pref.pairs.map((p) => [
        'preference',
        name(p.first),
        name(p.second),
        p.firstPreferred,
        p.secondPreferred,
        p.noPreference,
        p.test.estimate,
        lo(p.test.ci),
        hi(p.test.ci),
        p.test.p,
        p.adjustedP,
        adjustmentOf(f),
        p.sentence,
      ]),
      // "Which has more" has no "no preference" answer, so that cell stays empty.
      ...pref.attributes.flatMap((a) =>
        a.pairs.map((p) => [
          a.name,
          name(p.first),
          name(p.second),
          p.firstMore,
          p.secondMore,
          null,
          p.test.estimate,
          lo(p.test.ci),
          hi(p.test.ci),
          p.test.p,
          p.adjustedP,
          adjustmentOf(f),
          p.sentence,
        ]),
      ),
    ]
  },
}

export const scale: ExportTable = {
  header: ['recipe', 'log_ability', 'se', 'wins', 'comparisons', 'reference', 'reason'],
  rows: (f) =>
    (f.preferences?.scale.abilities ?? []).map((a) => [
      a.name,
      a.logAbility,
      a.se,
      a.wins,
      a.comparisons,
      a.item === f.preferences?.scale.reference,
      f.preferences?.scale.reason,
    ]),
}
