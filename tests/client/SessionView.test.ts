import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { NDialogProvider, NMessageProvider } from 'naive-ui'
import SessionView from '@/views/SessionView.vue'
import type { SessionDetail } from '@shared/schemas/sessions'
import { fakeServer, on } from './fakeServer'

afterEach(() => vi.unstubAllGlobals())

function detail(over: Partial<SessionDetail> = {}): SessionDetail {
  return {
    id: 7,
    name: 'Harewood A compound weight',
    format: 'pair',
    status: 'closed',
    deadline: '2026-11-02',
    recipeCount: 2,
    invitedCount: 6,
    doneCount: 6,
    timePointLabel: null,
    parentSessionId: null,
    createdBy: 'Dev',
    createdById: 1,
    createdAt: '2026-10-01T10:00:00.000Z',
    purpose: 'Which compound weight do players prefer?',
    recipeIds: [1, 2],
    clipSets: [
      {
        key: 'phrase · PF-02 · VN-3',
        clipIds: [7, 31],
        excerptName: 'phrase',
        performerCode: 'PF-02',
        instrumentCode: 'VN-3',
        clips: [
          {
            id: 7,
            recipeId: 1,
            recipeName: 'Harewood A plain',
            originalName: 'a.wav',
            archived: false,
          },
          {
            id: 31,
            recipeId: 2,
            recipeName: 'Harewood A heavy',
            originalName: 'b.wav',
            archived: true,
          },
        ],
        twins: [],
      },
    ],
    attributes: [],
    duplicates: 1,
    allowNoPreference: false,
    adjustment: 'holm',
    targetDifference: null,
    playerTitle: 'Evening listening',
    playerMessage: '',
    reminderDaysBefore: null,
    seed: 'x',
    locked: true,
    answersCount: 40,
    trialCount: 7,
    warnings: ["Set 'phrase · PF-02 · VN-3': clip 31 is archived"],
    recordProblem: null,
    sameTakeWarnings: [],
    sameTakeAccepted: null,
    recipes: [
      { id: 1, name: 'Harewood A plain' },
      { id: 2, name: 'Harewood A heavy' },
    ],
    timePoints: [],
    openedAt: '2026-10-02T10:00:00.000Z',
    closedAt: '2026-11-03T10:00:00.000Z',
    revision: 4,
    ...over,
  }
}

async function show(session: SessionDetail) {
  fakeServer(on('GET', '/sessions/7', () => ({ body: { session } })))
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/sessions', name: 'sessions', component: { render: () => null } },
      { path: '/sessions/:id', name: 'session', component: SessionView },
      { path: '/sessions/:id/findings', name: 'findings', component: { render: () => null } },
    ],
  })
  await router.push('/sessions/7')
  const Page = defineComponent(
    () => () => h(NMessageProvider, () => h(NDialogProvider, () => h(SessionView))),
  )
  const w = mount(Page, { global: { plugins: [router, createPinia()] } })
  await flushPromises()
  return w
}

describe('the session page', () => {
  it('warns near the top when the served record of an older session could not be rebuilt', async () => {
    const problem = 'answer 41 (trial 3) disagrees: the codes served were 418 and 207'
    const w = await show(detail({ recordProblem: problem }))
    const alert = w.find('[data-test=record-problem]')
    expect(alert.text()).toContain('Findings cannot be computed for this session')
    expect(alert.text()).toContain(problem)
    // Above the tabs, so it is read before the design.
    const html = w.html()
    expect(html.indexOf('data-test="record-problem"')).toBeLessThan(html.indexOf('n-tabs'))
  })

  it('says nothing of a record when it is sound, and marks archived clips in the sets', async () => {
    const w = await show(detail())
    expect(w.find('[data-test=record-problem]').exists()).toBe(false)
    const items = w.findAll('[data-test=session-clip-sets] li').map((li) => li.text())
    expect(items).toEqual([
      expect.stringMatching(/^Harewood A plain · clip 7$/),
      expect.stringMatching(/^Harewood A heavy · clip 31\s*Archived$/),
    ])
  })
})

describe('single takes on the session page', () => {
  const warning =
    "Set 'phrase · PF-02 · VN-3': Harewood A heavy has one take, so a trial that holds such a recipe twice plays the same recording twice."

  it('shows the single-take warning until it is accepted, then who accepted it and when', async () => {
    const before = await show(detail({ status: 'draft', sameTakeWarnings: [warning] }))
    expect(before.find('[data-test=same-take]').text()).toContain('Harewood A heavy has one take')
    expect(before.find('[data-test=same-take-accepted]').exists()).toBe(false)

    const after = await show(
      detail({
        sameTakeWarnings: [warning],
        sameTakeAccepted: { at: '2026-11-30T10:00:00.000Z', by: 'dev@example.test' },
      }),
    )
    expect(after.find('[data-test=same-take]').exists()).toBe(false)
    expect(after.find('[data-test=same-take-accepted]').text()).toContain(
      'accepted by dev@example.test on 2026-11-30',
    )
  })
})
