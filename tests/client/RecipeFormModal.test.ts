import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import RecipeFormModal from '@/components/RecipeFormModal.vue'
import type { RecipeFormMode } from '@/components/recipeForm'
import { recipeVersionBody } from '@shared/schemas/recipes'
import { fakeServer, on, recipe, refusal } from './fakeServer'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

async function open(mode: RecipeFormMode) {
  const w = mount(RecipeFormModal, {
    props: { show: false, recipe: recipe(), mode, recipes: [recipe()] },
    attachTo: document.body,
  })
  // The form fills itself from the recipe as the modal opens.
  await w.setProps({ show: true })
  await flushPromises()
  return w
}

/** The input of the form item with this label (the modal is drawn outside the wrapper). */
function field(label: string): HTMLInputElement | HTMLTextAreaElement {
  const item = [...document.querySelectorAll('.n-form-item')].find((el) =>
    el.querySelector('.n-form-item-label')?.textContent?.trim().startsWith(label),
  )
  const input = item?.querySelector('input, textarea') as HTMLInputElement | null
  if (!input) throw new Error(`No field labelled ${label}`)
  return input
}
async function type(label: string, value: string) {
  const input = field(label)
  input.value = value
  input.dispatchEvent(new Event('input', { bubbles: true }))
  input.dispatchEvent(new Event('blur'))
  await flushPromises()
}
async function submit() {
  document.querySelector('form')!.dispatchEvent(new Event('submit', { cancelable: true }))
  await flushPromises()
}
const button = (text: string) =>
  [...document.querySelectorAll('button')].find((b) => b.textContent?.trim() === text)

describe('the recipe form', () => {
  // WCAG 2.2 §1.3.1 and §4.1.2 (from memory): a field's visible label is its accessible name,
  // here through <label for> naming the input's id.
  it('labels every typed field for assistive technology', async () => {
    await open('edit')
    for (const name of [
      'Name',
      'Version',
      'Gauge',
      'Target tension',
      'Vibrating length',
      'Notes',
    ]) {
      const label = [...document.querySelectorAll('label')].find(
        (l) => l.textContent?.trim() === name,
      )
      expect(label, name).toBeDefined()
      const target = document.getElementById(label!.htmlFor)
      expect(target?.matches('input, textarea'), name).toBe(true)
      expect(target, name).toBe(field(name))
    }
  })

  it('sends a new version only the fields that change, as the versions route takes them', async () => {
    const { sent } = fakeServer(
      on('POST', '/recipes/1/versions', () => ({
        status: 201,
        body: { recipe: recipe({ id: 9, version: 2, parentId: 1, gaugeMm: 0.65 }) },
      })),
    )
    const w = await open('version')
    // A new version's number and parent are the server's to set: the form does not ask.
    expect(() => field('Version')).toThrow()
    expect(() => field('Derived from')).toThrow()
    await type('Gauge', '0.65')
    await type('Notes', 'Thicker core wrap')
    await submit()

    const post = sent.find((r) => r.method === 'POST')!
    expect(post.path).toBe('/recipes/1/versions')
    expect(post.body).toEqual({ gaugeMm: 0.65, notes: 'Thicker core wrap' })
    // The body is what the shared schema of POST /api/recipes/:id/versions accepts.
    expect(recipeVersionBody.safeParse(post.body).success).toBe(true)
    expect(w.emitted('saved')?.[0]?.[1]).toBe('version')
  })

  it('says so, and sends nothing, when a new version would change nothing', async () => {
    const { sent } = fakeServer()
    await open('version')
    await submit()
    expect(sent).toHaveLength(0)
    expect(document.querySelector('[data-test=recipe-save-error]')?.textContent).toContain(
      'Nothing differs from the recipe yet',
    )
  })

  it('shows a refused edit at the top and at each frozen field, and offers a new version', async () => {
    const message =
      'This recipe is tested in “Harewood A damping” (open), so its construction cannot change. ' +
      'Make a new version for later sessions.'
    const { sent } = fakeServer(
      on('PATCH', '/recipes/1', () =>
        refusal(message, { gaugeMm: ['Frozen: used by a session that has opened'] }),
      ),
      on('POST', '/recipes/1/versions', () => ({
        status: 201,
        body: { recipe: recipe({ id: 9, version: 2, parentId: 1, gaugeMm: 0.66 }) },
      })),
    )
    await open('edit')
    await type('Gauge', '0.66')
    await submit()

    // The edit sent only what changed, and the revision the form was loaded at.
    expect(sent[0]).toMatchObject({ method: 'PATCH', body: { gaugeMm: 0.66, revision: 3 } })
    const alert = document.querySelector('[data-test=recipe-save-error]')!
    expect(alert.textContent).toContain(message)
    const gauge = field('Gauge').closest('.n-form-item')!
    expect(gauge.textContent).toContain('Frozen: used by a session that has opened')

    button('Make a new version instead')!.click()
    await flushPromises()
    expect(document.querySelector('[data-test=recipe-save-error]')).toBeNull()
    // The change made in the refused edit carries over into the new version.
    expect((field('Gauge') as HTMLInputElement).value).toBe('0.66')
    await submit()
    expect(sent[1]).toMatchObject({ method: 'POST', path: '/recipes/1/versions' })
    expect(sent[1].body).toEqual({ gaugeMm: 0.66 })
  })

  it('does not offer a new version when the refusal is a name already taken', async () => {
    fakeServer(
      on('PATCH', '/recipes/1', () =>
        refusal('There is already a recipe "Harewood A wound" version 1', {
          name: ['Name and version are already in use'],
        }),
      ),
    )
    await open('edit')
    await type('Name', 'Harewood A wound')
    await submit()
    expect(document.querySelector('[data-test=recipe-save-error]')?.textContent).toContain(
      'There is already a recipe',
    )
    expect(button('Make a new version instead')).toBeUndefined()
  })

  describe('when someone else saved the recipe first', () => {
    // The other person's save: new notes, the revision moved on from the form's 3 to 4.
    const theirs = recipe({ notes: 'Rewound on the new lathe', revision: 4 })
    const stale = () => ({
      status: 409,
      body: {
        error: {
          code: 'conflict',
          message: 'Someone saved this recipe after you opened it, so your changes were not saved.',
          currentRevision: 4,
        },
      },
    })
    const dialog = () => document.querySelector('[data-test=edit-conflict]')

    it('offers both reloads, and keeping mine lays my change over theirs, unsaved', async () => {
      let patches = 0
      const { sent } = fakeServer(
        on('PATCH', '/recipes/1', (req) =>
          ++patches === 1 ? stale() : { body: { recipe: { ...theirs, ...(req.body as object) } } },
        ),
        on('GET', '/recipes/1', () => ({ body: { recipe: theirs } })),
      )
      const w = await open('edit')
      await type('Gauge', '0.66')
      await submit()

      expect(dialog()?.textContent).toContain(
        'This was changed by someone else since you opened it',
      )
      expect(button('Reload their version')).toBeDefined()
      button('Reload and keep my changes')!.click()
      await flushPromises()

      // Their notes and my gauge are both in the form; nothing was saved on the way.
      expect((field('Gauge') as HTMLInputElement).value).toBe('0.66')
      expect(field('Notes').value).toBe('Rewound on the new lathe')
      expect(sent.filter((r) => r.method === 'PATCH')).toHaveLength(1)
      expect(w.emitted('saved')).toBeUndefined()
      expect(document.querySelector('[data-test=reapplied]')?.textContent).toContain(
        'your changes to gauge on top',
      )

      await submit()
      const second = sent.filter((r) => r.method === 'PATCH')[1]
      // Only my change goes, over the revision just loaded: their notes are not sent back.
      expect(second.body).toEqual({ gaugeMm: 0.66, revision: 4 })
      expect(w.emitted('saved')).toHaveLength(1)
    })

    it('reloading their version drops my change and shows theirs', async () => {
      const { sent } = fakeServer(
        on('PATCH', '/recipes/1', stale),
        on('GET', '/recipes/1', () => ({ body: { recipe: theirs } })),
      )
      await open('edit')
      await type('Notes', 'My own notes')
      await submit()
      button('Reload their version')!.click()
      await flushPromises()

      expect(field('Notes').value).toBe('Rewound on the new lathe')
      expect(document.querySelector('[data-test=recipe-save-error]')).toBeNull()
      expect(sent.map((r) => r.method)).toEqual(['PATCH', 'GET'])
    })
  })
})
