import { ref, watch, type Ref } from 'vue'
import { ApiError } from '@/api/client'

// What every staff edit form does when its save was refused because someone else saved first:
// it offers EditConflictDialog, and never drops what the person typed without their say.

/** A save refused because the row moved on since the form was loaded. */
export const isEditConflict = (err: unknown): err is ApiError =>
  err instanceof ApiError && err.status === 409 && err.currentRevision !== undefined

export interface ConflictChoices {
  /** Load the newest version and drop the person's changes. */
  theirs: () => Promise<void>
  /** Load the newest version with the person's changes on top, unsaved. */
  keepMine: () => Promise<void>
}

/** Opens the dialog on a refused save (`error`, the form's save error) and runs the choice. */
export function useEditConflict(error: Ref<ApiError | null>, choices: ConflictChoices) {
  const conflictShown = ref(false)
  watch(error, (e) => {
    if (isEditConflict(e)) conflictShown.value = true
  })
  const run = (choice: () => Promise<void>) => async () => {
    conflictShown.value = false
    try {
      await choice()
    } catch (err) {
      // The form stays as the person left it; the alert says why nothing was loaded.
      error.value =
        err instanceof ApiError ? err : new ApiError(0, 'internal', (err as Error).message)
    }
  }
  return { conflictShown, reloadTheirs: run(choices.theirs), reloadKeepMine: run(choices.keepMine) }
}
