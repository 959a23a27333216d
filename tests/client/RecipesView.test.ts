import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { createPinia, setActivePinia } from 'pinia'
import { NDialogProvider, NMessageProvider, NSelect } from 'naive-ui'
import RecipesView from '@/views/RecipesView.vue'
import ArchivedFilter from '@/components/ArchivedFilter.vue'
import { useSessionStore } from '@/stores/session'
import { fakeServer, on, recipe, refusal } from './fakeServer'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const plain = recipe()
const retiredTrial = recipe({ id: 7, name: 'Harewood A trial', archivedAt: '2026-11-20T09:00:00Z' })

/** The list as the server filters it by `archived` (GET /api/recipes, listRecipesQuery). */
const listRecipes = on('GET', '/recipes', (req) => {
  const archived = req.query.get('archived') ?? 'hide'
  const all = [plain, retiredTrial]
  return {
    body: {
      recipes:
        archived === 'only'
          ? all.filter((r) => r.archivedAt)
          : archived === 'include'
            ? all
            : all.filter((r) => !r.archivedAt),
    },
  }
})

async function show() {
  const pinia = createPinia()
  setActivePinia(pinia)
  useSessionStore().user = { id: 2, email: 'dev@example.test', name: 'Dev', role: 'developer' }
  const Page = defineComponent(
    () => () => h(NMessageProvider, () => h(NDialogProvider, () => h(RecipesView))),
  )
  const w = mount(Page, { global: { plugins: [pinia] }, attachTo: document.body })
  await flushPromises()
  return w
}
const pause = (ms: number) => new Promise((r) => setTimeout(r, ms))
const rows = () => [...document.querySelectorAll('[data-test=recipes-table] tbody tr')]
const button = (text: string) =>
  [...document.querySelectorAll('button')].find((b) => b.textContent?.trim() === text)

describe('the recipes page', () => {
  it('hides archived recipes until asked, then marks them', async () => {
    const { sent } = fakeServer(listRecipes)
    const w = await show()
    const listed = sent.filter((r) => r.path === '/recipes')
    expect(listed.some((r) => r.query.get('archived') === 'hide')).toBe(true)
    expect(rows().map((r) => r.textContent)).toEqual([expect.stringContaining('Harewood A plain')])

    // The editor picks "Only archived" in the filter.
    w.findComponent(ArchivedFilter).findComponent(NSelect).vm.$emit('update:value', 'only')
    await pause(300)
    await flushPromises()
    expect(sent.filter((r) => r.path === '/recipes').map((r) => r.query.get('archived'))).toContain(
      'only',
    )
    expect(rows()).toHaveLength(1)
    expect(rows()[0].textContent).toContain('Harewood A trial')
    expect(rows()[0].querySelector('.archived-tag')?.textContent).toBe('Archived')
    // An archived recipe is restored, not archived again.
    rows()[0].querySelector<HTMLButtonElement>('button[aria-label^="More for"]')!.click()
    await flushPromises()
    const options = [...document.querySelectorAll('.n-dropdown-option')].map((o) => o.textContent)
    expect(options).toEqual(['Restore', 'Delete…'])
  })

  it('shows why a used recipe cannot be deleted and archives it instead', async () => {
    const why =
      'This recipe is used by “Harewood A damping” (open): archive it instead of deleting it.'
    const { sent } = fakeServer(
      listRecipes,
      on('DELETE', '/recipes/1', () => refusal(why)),
      on('POST', '/recipes/1/archive', () => ({
        body: { recipe: { ...plain, archivedAt: 'now' } },
      })),
    )
    await show()
    rows()[0].querySelector<HTMLButtonElement>('button[aria-label^="More for"]')!.click()
    await flushPromises()
    const del = [...document.querySelectorAll<HTMLElement>('.n-dropdown-option-body')].find(
      (o) => o.textContent === 'Delete…',
    )!
    del.click()
    await flushPromises()
    button('Delete for good')!.click()
    await flushPromises()
    expect(document.querySelector('[data-test=delete-refused]')?.textContent).toContain(why)

    button('Archive instead')!.click()
    await flushPromises()
    expect(sent.map((r) => `${r.method} ${r.path}`)).toContain('POST /recipes/1/archive')
  })
})
