import { hi, lo, type ExportTable } from './csv'

// The tables about the panel as a whole: the odd-one-out count and each player's reliability.

export const triangle: ExportTable = {
  header: [
    'correct',
    'n',
    'p',
    'minimum_correct_05',
    'minimum_correct_01',
    'pd',
    'pd_ci_lower',
    'pd_ci_upper',
    'd_prime',
    'd_prime_ci_lower',
    'd_prime_ci_upper',
    'd_prime_sentence',
    'repeats_set_aside',
    'verdict',
    'reason',
  ],
  rows: ({ triangle: t }) =>
    t
      ? [
          [
            t.correct,
            t.n,
            t.p,
            t.minimumCorrect05,
            t.minimumCorrect01,
            t.pd,
            lo(t.pdCi),
            hi(t.pdCi),
            t.dPrime,
            t.dPrimeCi?.lower,
            t.dPrimeCi?.upper,
            t.dPrimeSentence,
            t.repeatsSetAside,
            t.verdict,
            t.reason,
          ],
        ]
      : [],
}

export const reliability: ExportTable = {
  header: [
    'player',
    'duplicate_pairs',
    'misses',
    'miss_share',
    'loo_spearman',
    'flagged',
    'excluded',
    'exclusion_reason',
    'reason',
  ],
  rows: (f) =>
    f.reliability.players.map((p) => [
      p.playerCode,
      p.duplicatePairs,
      p.misses,
      p.missShare,
      p.looSpearman,
      p.flagged,
      p.excluded,
      p.exclusionReason,
      p.reason,
    ]),
}
