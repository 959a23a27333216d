import { describe, expect, it } from 'vitest'
import { editedFields, reapplyEdits, reappliedNote } from '@/composables/reapplyEdits'

// Laying one person's changes over a version saved since is a three-way merge against the
// version both started from: a field changed on one side only takes that side's value, and a
// field changed on both sides to different values is a conflict (the rule of diff3, GNU
// diffutils manual, "Comparing Three Files"; recalled from memory). Here the person's value
// wins such a conflict, and the field is named so they can look before saving.

const loaded = { name: 'Evening', notes: 'first', recipeIds: [1, 2], deadline: '2026-12-20' }

describe('reapplying my edits over a newer version', () => {
  it('takes their value where only they changed, mine where only I changed', () => {
    const mine = { ...loaded, notes: 'mine' }
    const newest = { ...loaded, name: 'Evening, second round' }

    const r = reapplyEdits(loaded, mine, newest)

    expect(r.form).toEqual({ ...loaded, name: 'Evening, second round', notes: 'mine' })
    expect(r.kept).toEqual(['notes'])
    expect(r.overridden).toEqual([])
  })

  it('names a field both changed to different values, keeping mine in the form', () => {
    const mine = { ...loaded, deadline: '2026-12-24' }
    const newest = { ...loaded, deadline: '2026-12-31' }

    const r = reapplyEdits(loaded, mine, newest)

    expect(r.form.deadline).toBe('2026-12-24')
    expect(r.overridden).toEqual(['deadline'])
  })

  it('does not count the same change made on both sides as a clash', () => {
    const mine = { ...loaded, notes: 'agreed' }
    const r = reapplyEdits(loaded, mine, { ...loaded, notes: 'agreed' })
    expect(r.overridden).toEqual([])
  })

  it('compares lists by value and hands back copies, not the arrays it was given', () => {
    const mine = { ...loaded, recipeIds: [1, 2, 3] }
    const newest = { ...loaded, recipeIds: [1, 2] }

    const r = reapplyEdits(loaded, mine, newest)
    r.form.recipeIds.push(4)

    expect(editedFields(loaded, { ...loaded, recipeIds: [1, 2] })).toEqual([])
    expect(mine.recipeIds).toEqual([1, 2, 3])
    expect(newest.recipeIds).toEqual([1, 2])
  })

  it('keeps the newest value of a field that can no longer change, and says so', () => {
    const mine = { ...loaded, recipeIds: [1, 3], notes: 'mine' }
    const r = reapplyEdits(loaded, mine, { ...loaded }, ['recipeIds'])

    expect(r.form.recipeIds).toEqual([1, 2])
    expect(r.dropped).toEqual(['recipeIds'])
    expect(reappliedNote(r, { recipeIds: 'recipes' })).toMatch(
      /changes to notes on top\. Your changes to recipes could not be kept/,
    )
  })

  it('says which of my changes are in the form and which fields we both changed', () => {
    const mine = { ...loaded, notes: 'mine', deadline: '2026-12-24' }
    const newest = { ...loaded, deadline: '2026-12-31' }

    const note = reappliedNote(reapplyEdits(loaded, mine, newest))

    expect(note).toContain('your changes to notes and deadline on top')
    expect(note).toContain('You both changed deadline')
    expect(note).toContain('Nothing is saved yet')
  })
})
