import { h } from 'vue'
import { NButton, NSpace, NTag, type DataTableColumns } from 'naive-ui'
import type { Recipe } from '@shared/schemas/recipes'
import { archiveMenu, archivedTag } from './archiveControls'

export interface RecipeColumnHandlers {
  /** Editors get the actions column. */
  canEdit: boolean
  edit: (recipe: Recipe) => void
  newVersion: (recipe: Recipe) => void
  archive: (recipe: Recipe) => void
  restore: (recipe: Recipe) => void
  remove: (recipe: Recipe) => void
  /** "Aurel A bare v1": with versions of one name, the parent's name alone is not enough. */
  parentLabel: (recipe: Recipe) => string | null
}

export const windingSummary = (r: Recipe) =>
  r.windings.length
    ? r.windings.map((w) => `${w.material} ${w.profile} ${w.wireMm} mm`).join(' / ')
    : 'plain'

export const dampingSummary = (r: Recipe) =>
  r.dampingKind === 'none'
    ? 'none'
    : r.dampingKind === 'compound' && r.dampingGrade
      ? `compound ${r.dampingGrade}`
      : r.dampingKind

const statusType = { draft: 'default', prototype: 'info', retired: 'warning' } as const

function actions(r: Recipe, on: RecipeColumnHandlers) {
  return h(NSpace, { size: 'small', wrap: false }, () => [
    h(NButton, { size: 'small', onClick: () => on.edit(r) }, () => 'Edit'),
    h(NButton, { size: 'small', onClick: () => on.newVersion(r) }, () => 'New version…'),
    archiveMenu({
      label: `${r.name} v${r.version}`,
      archived: r.archivedAt !== null,
      archive: () => on.archive(r),
      restore: () => on.restore(r),
      remove: () => on.remove(r),
    }),
  ])
}

/** The recipe table: construction at a glance, with what editors can do with each row. */
export function createRecipeColumns(on: RecipeColumnHandlers): DataTableColumns<Recipe> {
  return [
    {
      title: 'Recipe',
      key: 'name',
      width: 240,
      fixed: 'left',
      sorter: (a, b) => a.name.localeCompare(b.name) || a.version - b.version,
      render: (r) =>
        h('div', [
          h('strong', `${r.name} `),
          h('span', { class: 'version' }, `v${r.version}`),
          r.archivedAt ? ' ' : null,
          archivedTag(r.archivedAt),
          r.parentId ? h('div', { class: 'parent' }, `from ${on.parentLabel(r)}`) : null,
        ]),
    },
    {
      title: 'String',
      key: 'string',
      width: 120,
      render: (r) => `${r.instrument} ${r.stringName}`,
    },
    { title: 'Core', key: 'core', width: 170 },
    { title: 'Windings (inner → outer)', key: 'windings', width: 260, render: windingSummary },
    { title: 'Damping', key: 'dampingKind', width: 170, render: dampingSummary },
    {
      title: 'Gauge',
      key: 'gaugeMm',
      width: 90,
      sorter: (a, b) => (a.gaugeMm ?? 0) - (b.gaugeMm ?? 0),
      render: (r) => (r.gaugeMm === null ? '—' : `${r.gaugeMm} mm`),
    },
    {
      title: 'Tension',
      key: 'tensionN',
      width: 90,
      sorter: (a, b) => (a.tensionN ?? 0) - (b.tensionN ?? 0),
      render: (r) => (r.tensionN === null ? '—' : `${r.tensionN} N`),
    },
    {
      title: 'Status',
      key: 'status',
      width: 100,
      render: (r) => h(NTag, { size: 'small', type: statusType[r.status] }, () => r.status),
    },
    ...(on.canEdit
      ? [
          {
            title: '',
            key: 'actions',
            width: 250,
            fixed: 'right' as const,
            render: (r: Recipe) => actions(r, on),
          },
        ]
      : []),
  ]
}
