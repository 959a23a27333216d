import { h } from 'vue'
import { NButton, NDropdown, NTag, type DropdownOption } from 'naive-ui'

/** The mark of an archived row: kept for the sessions that use it, offered to no new one. */
export function archivedTag(archivedAt: string | null) {
  if (!archivedAt) return null
  return h(
    NTag,
    {
      size: 'small',
      bordered: false,
      type: 'warning',
      class: 'archived-tag',
      title: `Archived ${new Date(archivedAt).toLocaleDateString()}: kept for the sessions that use it`,
    },
    () => 'Archived',
  )
}

export interface ArchiveMenu {
  /** Names the row for screen readers: "More for Clip 12". */
  label: string
  archived: boolean
  archive: () => void
  restore: () => void
  remove: () => void
}

/**
 * Archive (or restore) and delete, under one small button: the rarer actions wait there so a
 * table's action column stays narrow enough to stay in view beside its data.
 */
export function archiveMenu(m: ArchiveMenu) {
  const options: DropdownOption[] = [
    m.archived ? { key: 'restore', label: 'Restore' } : { key: 'archive', label: 'Archive' },
    { key: 'delete', label: 'Delete…' },
  ]
  const select = (key: string) =>
    key === 'restore' ? m.restore() : key === 'archive' ? m.archive() : m.remove()
  return h(NDropdown, { trigger: 'click', options, onSelect: select }, () =>
    h(
      NButton,
      { size: 'small', quaternary: true, 'aria-label': `More for ${m.label}` },
      () => 'More ▾',
    ),
  )
}
