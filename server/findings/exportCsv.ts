import type { FindingsTable, Interval, SessionFindings } from '../../shared/schemas/findings'
import type { LongRow } from './answersToRatings'
import type { FindingsData } from './data'

/*
 * CSV for spreadsheets and R: RFC 4180 quoting, a header row, numbers at full precision and
 * empty cells for missing figures. Written here rather than with a library because the data
 * is small, flat and fully in memory.
 */

type Cell = string | number | boolean | null | undefined

// A text cell that a spreadsheet would run as a formula is prefixed so it stays text.
const FORMULA_START = /^[=+\-@\t\r]/

function cell(value: Cell): string {
  if (value === null || value === undefined) return ''
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : ''
  if (typeof value === 'boolean') return value ? 'true' : 'false'
  const text = FORMULA_START.test(value) ? `'${value}` : value
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text
}

export function toCsv(header: string[], rows: Cell[][]): string {
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n'
}

const lo = (ci: Interval | null) => ci?.lower ?? null
const hi = (ci: Interval | null) => ci?.upper ?? null

/** The raw answers in long format: one row per player × trial × attribute. */
export function answersCsv(data: FindingsData): string {
  const recipeName = new Map<string, string>(data.recipes.map((r) => [String(r.id), r.name]))
  const name = (id: unknown) => recipeName.get(String(id)) ?? String(id)
  const player = new Map(data.players.map((p) => [p.code, p]))
  const header = [
    'session',
    'player',
    'level',
    'instruments',
    'excluded',
    'trial',
    'repeat_of',
    'kind',
    'excerpt',
    'attribute',
    'blind_codes',
    'recipes',
    'answer_code',
    'answer_recipe',
    'value',
    'comment',
    'answered_at',
  ]
  const rows = data.resolved.rows.map((r: LongRow) => {
    const p = player.get(String(r.player))
    return [
      data.session.id,
      String(r.player),
      p?.level,
      p?.instruments.join(' '),
      p ? p.exclusionReason !== null : false,
      r.trial,
      r.repeatOf,
      r.kind,
      r.excerpt,
      r.attribute,
      r.codes.join(' '),
      r.recipes.map(name).join(' | '),
      r.answerCode,
      r.answerRecipe === null ? null : name(r.answerRecipe),
      r.value,
      r.comment,
      r.answeredAt,
    ]
  })
  return toCsv(header, rows)
}

/** One findings table as CSV, with recipe names spelled out beside the ids. */
export function tableCsv(f: SessionFindings, table: FindingsTable): string {
  const names = new Map(f.recipes.map((r) => [r.id, r.name]))
  const name = (id: number) => names.get(id) ?? String(id)
  switch (table) {
    case 'means':
      return toCsv(
        ['attribute', 'recipe', 'n', 'mean', 'sd', 'ci_lower', 'ci_upper', 'reason'],
        f.attributes.flatMap((a) =>
          a.recipes.map((r) => [a.name, r.name, r.n, r.mean, r.sd, lo(r.ci), hi(r.ci), r.reason]),
        ),
      )
    case 'pairs':
      return toCsv(
        [
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
          'holm_p',
          'wilcoxon_v',
          'wilcoxon_p',
          'wilcoxon_method',
          'wilcoxon_holm_p',
          'dz',
          'rank_biserial',
          'sentence',
          'reason',
        ],
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
            p.holmP,
            p.wilcoxonV,
            p.wilcoxonP,
            p.wilcoxonMethod,
            p.wilcoxonHolmP,
            p.dz,
            p.rankBiserial,
            p.sentence,
            p.reason,
          ]),
        ),
      )
    case 'omnibus':
      return toCsv(
        [
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
      )
    case 'preferences': {
      const header = [
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
        'holm_p',
        'sentence',
      ]
      const pref = f.preferences
      if (!pref) return toCsv(header, [])
      return toCsv(header, [
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
          p.holmP,
          p.sentence,
        ]),
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
            p.holmP,
            p.sentence,
          ]),
        ),
      ])
    }
    case 'scale':
      return toCsv(
        ['recipe', 'log_ability', 'se', 'wins', 'comparisons', 'reference', 'reason'],
        (f.preferences?.scale.abilities ?? []).map((a) => [
          a.name,
          a.logAbility,
          a.se,
          a.wins,
          a.comparisons,
          a.item === f.preferences?.scale.reference,
          f.preferences?.scale.reason,
        ]),
      )
    case 'triangle': {
      const t = f.triangle
      return toCsv(
        [
          'correct',
          'n',
          'p',
          'minimum_correct_05',
          'minimum_correct_01',
          'pd',
          'pd_ci_lower',
          'pd_ci_upper',
          'repeats_set_aside',
          'verdict',
          'reason',
        ],
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
                t.repeatsSetAside,
                t.verdict,
                t.reason,
              ],
            ]
          : [],
      )
    }
    case 'reliability':
      return toCsv(
        [
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
      )
    case 'objective':
      return toCsv(
        ['measure', 'unit', 'attribute', 'n', 'rho', 'p', 'reason'],
        f.objective.map((o) => [o.measure, o.unit, o.name, o.n, o.rho, o.p, o.reason]),
      )
    case 'aging':
      return toCsv(
        [
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
      )
  }
}

/** A neutral attachment name: the session id and the table, nothing else. */
export const exportFileName = (sessionId: number, what: string) =>
  `session-${sessionId}-${what}.csv`
