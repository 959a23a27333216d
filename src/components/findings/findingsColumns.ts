import { h } from 'vue'
import type { DataTableColumns } from 'naive-ui'
import type { AgingChange, MorePair, ObjectiveRow, PreferencePair } from '@shared/schemas/findings'
import type { PAdjustment } from '@shared/schemas/sessions'
import { adjustedTitle, interval, num, percent, pValue } from './format'

/** What the pair tables need from the page: recipes appear by name, never by id alone. */
export interface PairColumnHandlers {
  recipeName: (id: number) => string
  /** The session's adjustment, named in the adjusted p's column. */
  adjustment: PAdjustment
}

export function createPreferenceColumns({
  recipeName,
  adjustment,
}: PairColumnHandlers): DataTableColumns<PreferencePair> {
  return [
    {
      title: 'Pair',
      key: 'pair',
      width: 260,
      render: (r) => `${recipeName(r.first)} vs ${recipeName(r.second)}`,
    },
    { title: 'Preferred first', key: 'firstPreferred', width: 110 },
    { title: 'Preferred second', key: 'secondPreferred', width: 120 },
    { title: 'No preference', key: 'noPreference', width: 110 },
    {
      title: 'Share (95% CI)',
      key: 'share',
      width: 170,
      render: (r) =>
        `${percent(r.test.estimate)} (${r.test.ci ? `${percent(r.test.ci.lower)}–${percent(r.test.ci.upper)}` : '—'})`,
    },
    { title: 'Sign test p', key: 'p', width: 95, render: (r) => pValue(r.test.p) },
    {
      title: adjustedTitle(adjustment),
      key: 'adjustedP',
      width: 80,
      render: (r) => h('strong', pValue(r.adjustedP)),
    },
    { title: 'In words', key: 'sentence', minWidth: 260 },
  ]
}

export function createMorePairColumns({
  recipeName,
  adjustment,
}: PairColumnHandlers): DataTableColumns<MorePair> {
  return [
    {
      title: 'Pair',
      key: 'pair',
      width: 260,
      render: (r) => `${recipeName(r.first)} vs ${recipeName(r.second)}`,
    },
    { title: 'First has more', key: 'firstMore', width: 110 },
    { title: 'Second has more', key: 'secondMore', width: 120 },
    { title: 'Sign test p', key: 'p', width: 95, render: (r) => pValue(r.test.p) },
    {
      title: adjustedTitle(adjustment),
      key: 'adjustedP',
      width: 80,
      render: (r) => pValue(r.adjustedP),
    },
    { title: 'In words', key: 'sentence', minWidth: 260 },
  ]
}

export function createObjectiveColumns(): DataTableColumns<ObjectiveRow> {
  return [
    { title: 'Measure', key: 'measure', width: 130, render: (r) => `${r.measure} (${r.unit})` },
    { title: 'Attribute', key: 'name', width: 140 },
    { title: 'Clips', key: 'n', width: 70 },
    { title: 'Spearman ρ', key: 'rho', width: 110, render: (r) => num(r.rho, 2) },
    { title: 'p', key: 'p', width: 80, render: (r) => pValue(r.p) },
    {
      title: 'Pearson r (95% CI)',
      key: 'pearsonR',
      width: 170,
      render: (r) =>
        r.pearsonR === null
          ? '—'
          : `${num(r.pearsonR, 2)}${r.pearsonCi ? ` (${interval(r.pearsonCi, 2)})` : ''}`,
    },
    { title: 'p', key: 'pearsonP', width: 80, render: (r) => pValue(r.pearsonP) },
    { title: '', key: 'reason', minWidth: 160, render: (r) => r.reason ?? '' },
  ]
}

export function createAgingColumns(adjustment: PAdjustment): DataTableColumns<AgingChange> {
  return [
    { title: 'Recipe', key: 'name', width: 200 },
    { title: 'From → to', key: 'span', width: 150, render: (r) => `${r.from} → ${r.to}` },
    { title: 'n', key: 'n', width: 50 },
    { title: 'Change', key: 'difference', width: 80, render: (r) => num(r.difference) },
    { title: '95% CI', key: 'ci', width: 120, render: (r) => interval(r.ci) },
    { title: 'p', key: 'p', width: 70, render: (r) => pValue(r.p) },
    { title: 'Wilcoxon p', key: 'wilcoxonP', width: 95, render: (r) => pValue(r.wilcoxonP) },
    {
      title: adjustedTitle(adjustment),
      key: 'adjustedP',
      width: 80,
      render: (r) => pValue(r.adjustedP),
    },
    { title: 'dz', key: 'dz', width: 60, render: (r) => num(r.dz, 2) },
    {
      title: 'r (rank-biserial)',
      key: 'rankBiserial',
      width: 90,
      render: (r) => num(r.rankBiserial, 2),
    },
    { title: 'In words', key: 'sentence', minWidth: 260 },
  ]
}
