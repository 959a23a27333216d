import { h } from 'vue'
import { NButton, NSpace, NTag, type DataTableColumns } from 'naive-ui'
import type { Clip } from '@shared/schemas/clips'
import { fmt } from './clipFormat'
import { archiveMenu, archivedTag } from './archiveControls'

export interface ClipColumnHandlers {
  /** Editors get archive and delete, and the actions column widens for them. */
  canEdit: boolean
  preview: (clip: Clip) => void
  archive: (clip: Clip) => void
  restore: (clip: Clip) => void
  remove: (clip: Clip) => void
}

/** The clip library's table: what each clip is, how it measured, and what can be done with it. */
export function createClipColumns({
  canEdit,
  preview,
  archive,
  restore,
  remove,
}: ClipColumnHandlers): DataTableColumns<Clip> {
  return [
    { title: 'Clip', key: 'id', width: 70, sorter: (a, b) => a.id - b.id },
    {
      title: 'Recipe',
      key: 'recipeName',
      width: 260,
      sorter: (a, b) => a.recipeName.localeCompare(b.recipeName),
      render: (c) =>
        h(NSpace, { size: 6, align: 'center', wrap: false }, () => [
          `${c.recipeName} v${c.recipeVersion}`,
          archivedTag(c.archivedAt),
        ]),
    },
    { title: 'Excerpt', key: 'excerptName', width: 130, sorter: 'default' },
    {
      title: 'Kind',
      key: 'kind',
      width: 100,
      render: (c) => h(NTag, { size: 'small', bordered: false }, () => c.kind),
    },
    { title: 'Performer', key: 'performerCode', width: 120, sorter: 'default' },
    { title: 'Instrument', key: 'instrumentCode', width: 125, sorter: 'default' },
    {
      title: 'Loudness',
      key: 'loudnessLufs',
      width: 115,
      sorter: (a, b) => a.loudnessLufs - b.loudnessLufs,
      render: (c) => fmt.lufs(c.loudnessLufs),
    },
    {
      title: 'Centroid',
      key: 'centroidHz',
      width: 100,
      sorter: (a, b) => (a.centroidHz ?? 0) - (b.centroidHz ?? 0),
      render: (c) => fmt.hz(c.centroidHz),
    },
    {
      title: 'T60 / attack',
      key: 'response',
      width: 115,
      render: (c) => (c.kind === 'plucked' ? fmt.seconds(c.t60S) : fmt.ms(c.attackS)),
    },
    {
      title: 'Length',
      key: 'durationS',
      width: 100,
      sorter: (a, b) => a.durationS - b.durationS,
      render: (c) => fmt.seconds(c.durationS),
    },
    { title: 'Recorded', key: 'recordedOn', width: 110, render: (c) => c.recordedOn ?? '—' },
    {
      title: '',
      key: 'actions',
      width: canEdit ? 180 : 110,
      // Kept in view: the measures scroll beside it on narrower screens.
      fixed: 'right',
      render: (c) =>
        h(NSpace, { size: 'small', wrap: false }, () => [
          h(
            NButton,
            { size: 'small', onClick: () => preview(c), 'data-test': 'preview' },
            () => 'Listen ▶',
          ),
          canEdit
            ? archiveMenu({
                label: `Clip ${c.id}`,
                archived: c.archivedAt !== null,
                archive: () => archive(c),
                restore: () => restore(c),
                remove: () => remove(c),
              })
            : null,
        ]),
    },
  ]
}
