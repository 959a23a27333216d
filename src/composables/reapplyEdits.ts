/*
 * When a save is refused because someone else saved first, the person may load the newest
 * version and keep their own changes: every field they changed takes their value, every other
 * field the newest one. Nothing they typed is dropped; where both changed a field, theirs wins
 * and the field is named, so they can look before saving again.
 */

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b)
const copy = <V>(v: V): V => (v === undefined ? v : (JSON.parse(JSON.stringify(v)) as V))

/** The fields of `mine` that differ from the form as it was loaded. */
export function editedFields<T extends object>(loaded: T, mine: T): (keyof T)[] {
  return (Object.keys(mine) as (keyof T)[]).filter((k) => !same(loaded[k], mine[k]))
}

export interface Reapplied<T> {
  /** The newest version with the person's changes on top: a fresh copy, safe to edit. */
  form: T
  /** The fields that took the person's value. */
  kept: (keyof T)[]
  /** Fields both changed, to different values: the person's value is in the form. */
  overridden: (keyof T)[]
  /** Fields the person changed that can no longer change (`fixed`): the newest value stays. */
  dropped: (keyof T)[]
}

/**
 * Lays the person's changes (`mine` against `loaded`, the form as it was opened) over `newest`,
 * the form of the version saved since. Changes to `fixed` fields (locked since) are not laid
 * over but named in `dropped`.
 */
export function reapplyEdits<T extends object>(
  loaded: T,
  mine: T,
  newest: T,
  fixed: readonly (keyof T)[] = [],
): Reapplied<T> {
  const form = copy(newest)
  const edited = editedFields(loaded, mine)
  const dropped = edited.filter((k) => fixed.includes(k) && !same(mine[k], newest[k]))
  const kept = edited.filter((k) => !fixed.includes(k))
  for (const k of kept) form[k] = copy(mine[k])
  const overridden = kept.filter((k) => !same(loaded[k], newest[k]) && !same(mine[k], newest[k]))
  return { form, kept, overridden, dropped }
}

const words = (field: string) => field.replace(/[A-Z]/g, (c) => ` ${c.toLowerCase()}`)
const list = (fields: string[]) =>
  fields.length < 2 ? fields.join('') : `${fields.slice(0, -1).join(', ')} and ${fields.at(-1)}`

/** What the form says after the person's changes were laid over the newest version. */
export function reappliedNote<T extends object>(
  r: Reapplied<T>,
  labels: Partial<Record<keyof T, string>> = {},
): string {
  const name = (k: keyof T) => labels[k] ?? words(String(k))
  const lost = r.dropped.length
    ? ` Your changes to ${list(r.dropped.map(name))} could not be kept: these can no longer change.`
    : ''
  if (r.kept.length === 0) return `The newest version is loaded.${lost}`.trim()
  const both = r.overridden.length
    ? ` You both changed ${list(r.overridden.map(name))}: yours is in the form, and replaces theirs when you save.`
    : ''
  return (
    `The newest version is loaded with your changes to ${list(r.kept.map(name))} on top.${both}${lost} ` +
    'Nothing is saved yet: look it over, then save.'
  )
}
