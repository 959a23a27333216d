import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import SessionDesignForm from '@/components/SessionDesignForm.vue'
import type { SessionDetail } from '@shared/schemas/sessions'
import { fakeServer, on, recipe } from './fakeServer'

// The designer's save refused because a colleague saved the session first: the person's
// changes are laid over the newest design, except those players' answers have locked since.

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const session = (over: Partial<SessionDetail> = {}): SessionDetail => ({
  id: 9,
  name: 'Autumn bench round',
  format: 'playtest',
  status: 'open',
  deadline: '2026-12-20',
  recipeCount: 2,
  invitedCount: 4,
  doneCount: 0,
  timePointLabel: null,
  parentSessionId: null,
  createdBy: 'Dev',
  createdById: 1,
  createdAt: '2026-11-01T10:00:00.000Z',
  purpose: '',
  recipeIds: [1, 2],
  clipSets: [],
  attributes: [],
  duplicates: 0,
  allowNoPreference: false,
  adjustment: 'holm',
  targetDifference: null,
  playerTitle: 'Strings to try at home',
  playerMessage: 'Play each set for two days.',
  reminderDaysBefore: 2,
  seed: 'x',
  locked: false,
  answersCount: 0,
  trialCount: 2,
  warnings: [],
  recordProblem: null,
  sameTakeWarnings: [],
  sameTakeAccepted: null,
  recipes: [],
  timePoints: [],
  openedAt: '2026-11-02T10:00:00.000Z',
  closedAt: null,
  revision: 2,
  ...over,
})

const input = (label: string) => {
  const item = [...document.querySelectorAll('.n-form-item')].find((el) =>
    el.querySelector('.n-form-item-label')?.textContent?.trim().startsWith(label),
  )
  return item!.querySelector('input, textarea') as HTMLInputElement
}
async function type(label: string, value: string) {
  const el = input(label)
  el.value = value
  el.dispatchEvent(new Event('input', { bubbles: true }))
  el.dispatchEvent(new Event('blur'))
  await flushPromises()
}
const button = (text: string) =>
  [...document.querySelectorAll('button')].find((b) => b.textContent?.trim() === text)

describe('the designer, when a colleague saved the session first', () => {
  it('keeps my words over their newer design, names what is locked now, and saves over it', async () => {
    // Since the form opened: a new title, two hidden duplicates, and a first answer (locked).
    const theirs = session({
      playerTitle: 'Strings for the week',
      duplicates: 2,
      locked: true,
      answersCount: 1,
      revision: 3,
    })
    let patches = 0
    const { sent } = fakeServer(
      on('GET', '/recipes', () => ({ body: { recipes: [recipe()] } })),
      on('GET', '/sessions/9', () => ({ body: { session: theirs } })),
      on('PATCH', '/sessions/9', () =>
        ++patches === 1
          ? {
              status: 409,
              body: {
                error: {
                  code: 'conflict',
                  message: 'Someone saved this session after you opened it.',
                  currentRevision: 3,
                },
              },
            }
          : { body: { session: { ...theirs, revision: 4 } } },
      ),
    )
    const w = mount(SessionDesignForm, { props: { session: session() }, attachTo: document.body })
    await flushPromises()
    await type('Player message', 'Play each set for three days.')
    await type('Hidden duplicates', '1')
    await w.find('form').trigger('submit')
    await flushPromises()

    expect(sent.find((r) => r.method === 'PATCH')!.body).toMatchObject({ revision: 2 })
    expect(document.querySelector('[data-test=edit-conflict]')?.textContent).toContain(
      'This was changed by someone else since you opened it',
    )
    button('Reload and keep my changes')!.click()
    await flushPromises()

    expect(input('Player message').value).toBe('Play each set for three days.')
    expect(input('Player title').value).toBe('Strings for the week')
    expect(input('Hidden duplicates').value).toBe('2')
    const note = document.querySelector('[data-test=reapplied]')!.textContent!
    expect(note).toContain('your changes to player message on top')
    expect(note).toContain('Your changes to hidden duplicates could not be kept')
    expect(w.emitted('reloaded')?.[0]?.[0]).toMatchObject({ revision: 3 })
    expect(w.emitted('saved')).toBeUndefined()

    await w.find('form').trigger('submit')
    await flushPromises()
    const second = sent.filter((r) => r.method === 'PATCH')[1]
    // Locked now: only the words go, over the revision just loaded.
    expect(second.body).toEqual({
      name: 'Autumn bench round',
      purpose: '',
      playerTitle: 'Strings for the week',
      playerMessage: 'Play each set for three days.',
      deadline: '2026-12-20',
      reminderDaysBefore: 2,
      revision: 3,
    })
    expect(w.emitted('saved')).toHaveLength(1)
  })
})
