import { h, watch } from 'vue'
import { useDialog, useMessage } from 'naive-ui'
import { ApiError } from '@/api/client'
import { useAsync } from './useAsync'

/** What one list (clips, recipes) lets editors do with a row it may only archive once used. */
export interface ArchivingActions<T> {
  /** How the row is named in titles and messages, e.g. "Clip 12" or "Aurel A bare v1". */
  label: (item: T) => string
  isArchived: (item: T) => boolean
  /** What deleting for good takes with it, shown before the editor confirms. */
  deleteWarning: (item: T) => string
  remove: (item: T) => Promise<unknown>
  archive: (item: T) => Promise<unknown>
  restore: (item: T) => Promise<unknown>
  reload: () => Promise<unknown>
}

/**
 * Archive, restore and delete with their confirmations. The client cannot know whether a
 * session uses a row, so delete is always offered; when the server refuses it (409), its
 * words are shown with archiving as the way out.
 */
export function useArchiving<T>(actions: ArchivingActions<T>) {
  const dialog = useDialog()
  const message = useMessage()

  const act = useAsync(async (fn: () => Promise<unknown>, done: string) => {
    await fn()
    message.success(done)
    await actions.reload()
  })
  watch(act.error, (e) => e && message.error(e.message))

  const archive = (item: T) =>
    act.run(
      () => actions.archive(item),
      `${actions.label(item)} archived: hidden from lists and pickers, kept for its sessions`,
    )
  const restore = (item: T) =>
    act.run(() => actions.restore(item), `${actions.label(item)} restored`)

  function refused(item: T, why: string) {
    const canArchive = !actions.isArchived(item)
    dialog.warning({
      title: `${actions.label(item)} was not deleted`,
      content: () =>
        h('div', { 'data-test': 'delete-refused' }, [
          h('p', why),
          canArchive
            ? h(
                'p',
                'Archiving hides it from lists and pickers; the sessions that use it keep it, ' +
                  'findings and all. It can be restored at any time.',
              )
            : null,
        ]),
      positiveText: canArchive ? 'Archive instead' : 'OK',
      negativeText: canArchive ? 'Keep it as it is' : undefined,
      onPositiveClick: () => {
        if (canArchive) void archive(item)
      },
    })
  }

  async function deleteForGood(item: T) {
    try {
      await actions.remove(item)
    } catch (err) {
      if (err instanceof ApiError && err.status === 409) return refused(item, err.message)
      message.error(err instanceof Error ? err.message : String(err))
      return
    }
    message.success(`${actions.label(item)} deleted`)
    await actions.reload()
  }

  function remove(item: T) {
    dialog.warning({
      title: `Delete ${actions.label(item)}?`,
      content: actions.deleteWarning(item),
      positiveText: 'Delete for good',
      negativeText: 'Cancel',
      onPositiveClick: () => {
        void deleteForGood(item)
      },
    })
  }

  return { archive, restore, remove, busy: act.loading }
}
