import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { createPinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { NMessageProvider } from 'naive-ui'
import FindingsView from '@/views/FindingsView.vue'
import type { SessionFindings } from '@shared/schemas/findings'
import { fakeServer, on, refusal } from './fakeServer'

beforeEach(() => vi.stubEnv('TZ', 'UTC'))
afterEach(() => {
  vi.unstubAllGlobals()
  vi.unstubAllEnvs()
})

const findings: SessionFindings = {
  session: {
    id: 6,
    name: 'Harewood A damping',
    format: 'rating',
    status: 'closed',
    adjustment: 'holm',
    timePointLabel: null,
  },
  summary: { invited: 12, done: 12, inProgress: 0, excluded: 1, answers: 312, completion: 1 },
  filters: { instrument: null, level: null, available: { instruments: [], levels: [] } },
  reason: null,
  recipes: [],
  attributes: [],
  preferences: null,
  triangle: null,
  reliability: { rule: '', players: [] },
  objective: [],
  aging: null,
  provenance: {
    answers: 312,
    players: 12,
    excluded: 1,
    headphoneExcluded: 0,
    lastAnswerAt: '2026-12-02T14:03:00.000Z',
    lastChange: { action: 'findings.player_excluded', at: '2026-12-02T14:10:00.000Z' },
  },
}

async function show() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/sessions', name: 'sessions', component: { render: () => null } },
      { path: '/sessions/:id', name: 'session', component: { render: () => null } },
      { path: '/sessions/:id/findings', name: 'findings', component: FindingsView },
    ],
  })
  await router.push('/sessions/6/findings')
  const Page = defineComponent(() => () => h(NMessageProvider, () => h(FindingsView)))
  const w = mount(Page, { global: { plugins: [router, createPinia()] } })
  await flushPromises()
  return w
}

describe('the findings page', () => {
  it('says what the findings rest on, on screen and in the report', async () => {
    fakeServer(on('GET', '/findings/6', () => ({ body: findings })))
    const w = await show()
    expect(w.find('[data-test=provenance]').text()).toBe(
      'Computed from 312 answers of 12 players, 1 excluded; last answer 2 Dec 2026 14:03; ' +
        'last change: player excluded, 2 Dec 2026 14:10',
    )
  })

  it('shows the server’s reason, not an empty page, when findings are refused', async () => {
    const why =
      "This session's served record could not be rebuilt: answer 41 (trial 3) disagrees: " +
      'the codes served were 418 and 207'
    fakeServer(on('GET', '/findings/6', () => refusal(why)))
    const w = await show()
    const alert = w.find('[data-test=findings-error]')
    expect(alert.text()).toContain('Findings cannot be computed for this session')
    expect(alert.text()).toContain(why)
    expect(w.find('[data-test=provenance]').exists()).toBe(false)
    expect(w.find('.n-spin').exists()).toBe(false)
  })
})
