import { afterEach, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick, reactive, ref, shallowRef } from 'vue'
import { ApiError } from '@/api/client'
import { useConflictReload } from '@/composables/useConflictReload'

// A save refused because someone else saved first: 409 Conflict, "a conflict with the current
// state of the target resource" (RFC 9110, HTTP Semantics, section 15.5.10; recalled from
// memory). Keeping the person's changes over the newer version follows the three-way rule of
// diff3 (GNU diffutils manual, "Comparing Three Files"; recalled from memory): a field changed
// on one side only takes that side's value; changed on both, here the person's value wins and
// the field is named. The notes below are written out by hand as the person should read them.

interface Design {
  id: number
  revision: number
  locked: boolean
  title: string
  message: string
  deadline: string
  recipeIds: number[]
}
type DesignForm = Pick<Design, 'title' | 'message' | 'deadline' | 'recipeIds'>
const design = (over: Partial<Design> = {}): Design => ({
  id: 7,
  revision: 2,
  locked: false,
  title: 'Evening listening',
  message: 'Play each set for two days.',
  deadline: '2026-12-20',
  recipeIds: [1, 2],
  ...over,
})
const formOf = (d: Design): DesignForm => ({
  title: d.title,
  message: d.message,
  deadline: d.deadline,
  recipeIds: [...d.recipeIds],
})
const refused = () =>
  new ApiError(409, 'conflict', 'Someone saved this after you opened it.', {}, [], 3)

let scope = effectScope()
afterEach(() => scope.stop())

/** A form as an edit form holds it, opened on revision 2, with the newer revision given. */
function setUp(theirs: Design | Error, form: 'reactive' | 'ref' = 'reactive') {
  scope = effectScope()
  const error = shallowRef<ApiError | null>(null)
  const loaded = ref<Design | null>(design())
  const fields = form === 'ref' ? ref(formOf(design())) : reactive(formOf(design()))
  const newest = vi.fn(async (_row: Design) => {
    if (theirs instanceof Error) throw theirs
    return theirs
  })
  const conflict = scope.run(() =>
    useConflictReload({
      error,
      loaded,
      form: fields,
      formOf,
      newest,
      fixed: (d) => (d.locked ? ['recipeIds'] : []),
      labels: { message: 'player message' },
    }),
  )!
  const read = () => ('value' in fields ? fields.value : fields) as DesignForm
  return { error, loaded, fields, read, newest, ...conflict }
}

describe('reloading after a save was refused because someone saved first', () => {
  it('offers the choice only for a refusal that names the revision it is at now', async () => {
    const c = setUp(design({ revision: 3 }))

    c.error.value = new ApiError(409, 'conflict', 'Refused')
    await nextTick()
    expect(c.conflictShown.value).toBe(false)

    c.error.value = refused()
    await nextTick()
    expect(c.conflictShown.value).toBe(true)
  })

  it('reloading theirs fills the form with their version in place and drops mine', async () => {
    const c = setUp(design({ revision: 3, title: 'Evening listening, second round' }))
    const form = c.read()
    form.message = 'Play each set for three days.'
    c.error.value = refused()
    await nextTick()

    await c.reloadTheirs()

    expect(c.newest).toHaveBeenCalledWith(expect.objectContaining({ id: 7, revision: 2 }))
    expect(c.read()).toBe(form)
    expect(form).toEqual({
      title: 'Evening listening, second round',
      message: 'Play each set for two days.',
      deadline: '2026-12-20',
      recipeIds: [1, 2],
    })
    expect(c.loaded.value?.revision).toBe(3)
    expect(c.error.value).toBeNull()
    expect(c.reappliedText.value).toBe('')
    expect(c.conflictShown.value).toBe(false)
  })

  it('keeping mine lays my changes over theirs, unsaved, and names the field we both changed', async () => {
    const c = setUp(
      design({ revision: 3, title: 'Evening listening, second round', deadline: '2026-12-31' }),
      'ref',
    )
    Object.assign(c.read(), { message: 'Play each set for three days.', deadline: '2026-12-24' })
    c.error.value = refused()
    await nextTick()

    await c.reloadKeepMine()

    expect(c.read()).toEqual({
      title: 'Evening listening, second round',
      message: 'Play each set for three days.',
      deadline: '2026-12-24',
      recipeIds: [1, 2],
    })
    expect(c.loaded.value?.revision).toBe(3)
    expect(c.error.value).toBeNull()
    expect(c.reappliedText.value).toBe(
      'The newest version is loaded with your changes to player message and deadline on top. ' +
        'You both changed deadline: yours is in the form, and replaces theirs when you save. ' +
        'Nothing is saved yet: look it over, then save.',
    )
  })

  it('keeps their value of a field that can no longer change, and says mine was not kept', async () => {
    const c = setUp(design({ revision: 3, locked: true }))
    Object.assign(c.read(), { title: 'Autumn round', recipeIds: [1, 3] })

    await c.reloadKeepMine()

    expect(c.read()).toMatchObject({ title: 'Autumn round', recipeIds: [1, 2] })
    expect(c.reappliedText.value).toBe(
      'The newest version is loaded with your changes to title on top. ' +
        'Your changes to recipe ids could not be kept: these can no longer change. ' +
        'Nothing is saved yet: look it over, then save.',
    )
  })

  it('leaves the form as I left it when their version cannot be loaded, and says why', async () => {
    const c = setUp(new Error('The network is down'))
    c.read().message = 'Play each set for three days.'
    c.error.value = refused()
    await nextTick()

    await c.reloadKeepMine()

    expect(c.read().message).toBe('Play each set for three days.')
    expect(c.loaded.value?.revision).toBe(2)
    expect(c.error.value).toMatchObject({
      status: 0,
      code: 'internal',
      message: 'The network is down',
    })
    expect(c.conflictShown.value).toBe(false)
  })
})
