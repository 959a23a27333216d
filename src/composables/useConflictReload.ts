import { isRef, ref, type Ref } from 'vue'
import type { ApiError } from '@/api/client'
import { reapplyEdits, reappliedNote } from './reapplyEdits'
import { useEditConflict } from './useEditConflict'

// The two reloads a staff edit form offers after a refused save, written once: each form says
// only how it loads its row, how a row becomes the form, and what its fields are called.

export interface ConflictReloadOptions<Row, Form extends object> {
  /** The form's save error: a refused save opens the dialog, a failed reload is shown here. */
  error: Ref<ApiError | null>
  /** The row as the form was loaded; either reload puts the newest version in its place. */
  loaded: Ref<Row | null>
  /** The form's fields: a reactive object filled in place, or a ref given a new value. */
  form: NoInfer<Form> | Ref<NoInfer<Form>>
  /** Loads the newest version of `row`, and tells whoever keeps a copy of it. */
  newest: (row: Row) => Promise<Row>
  formOf: (row: Row) => Form
  /** Fields the newest version no longer lets change: the person's changes to them are dropped. */
  fixed?: (newest: Row) => readonly (keyof Form)[]
  /** Names for the note, where a field's own name does not read well. */
  labels?: Partial<Record<keyof Form, string>>
}

/** Offers EditConflictDialog on a refused save and runs "theirs" or "keep mine" for the form. */
export function useConflictReload<Row, Form extends object>(o: ConflictReloadOptions<Row, Form>) {
  /** Said once the person's changes were laid over a newer version, until they save. */
  const reappliedText = ref('')
  const { form } = o
  const read = (): Form => (isRef(form) ? form.value : { ...form })
  const write = (next: Form) => {
    if (isRef(form)) form.value = next
    else Object.assign(form, next)
  }
  // Only once the newest version is in: a failed load leaves the form as the person left it.
  const show = (row: Row, next: Form, note: string) => {
    o.loaded.value = row
    write(next)
    o.error.value = null
    reappliedText.value = note
  }

  const { conflictShown, reloadTheirs, reloadKeepMine } = useEditConflict(o.error, {
    theirs: async () => {
      const row = await o.newest(o.loaded.value!)
      show(row, o.formOf(row), '')
    },
    keepMine: async () => {
      const before = o.formOf(o.loaded.value!)
      const row = await o.newest(o.loaded.value!)
      const result = reapplyEdits(before, read(), o.formOf(row), o.fixed?.(row))
      show(row, result.form, reappliedNote(result, o.labels))
    },
  })
  return { conflictShown, reloadTheirs, reloadKeepMine, reappliedText }
}
