import { z } from 'zod'

// Every edit form carries the revision of the row it was loaded from; the server saves only
// over that revision, so a second person's save never silently undoes the first one's.

export const revision = z
  .number('Reload the page: this form does not say which version it changes')
  .int()
  .min(1)

/** The fields a change names, the revision aside: a body of a revision alone changes nothing. */
export const namesAChange = (body: object) => Object.keys(body).some((k) => k !== 'revision')

/** What a 409 of an edit carries beside its code and message. */
export interface RevisionConflict {
  currentRevision: number
}
