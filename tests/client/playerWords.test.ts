import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import LabelSheet from '@/components/LabelSheet.vue'
import SessionDesignForm from '@/components/SessionDesignForm.vue'
import type { LabelSheet as Sheet, PackingList, SessionDetail } from '@shared/schemas/sessions'
import { fakeServer, on, recipe } from './fakeServer'

// What players see is kept apart on the staff screens: the designer's "What players see" group
// with the server's refusals at its fields, and the labels printed apart from the packing list.

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const session = (over: Partial<SessionDetail> = {}): SessionDetail => ({
  id: 9,
  name: 'Harewood A plain vs Harewood A heavy',
  format: 'playtest',
  status: 'draft',
  deadline: '2026-12-20',
  recipeCount: 2,
  invitedCount: 0,
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
  recipes: [
    { id: 1, name: 'Harewood A plain' },
    { id: 2, name: 'Harewood A heavy' },
  ],
  timePoints: [],
  openedAt: null,
  closedAt: null,
  revision: 1,
  ...over,
})

const itemLabelled = (label: string) =>
  [...document.querySelectorAll('.n-form-item')].find(
    (el) => el.querySelector('.n-form-item-label')?.textContent?.trim() === label,
  )

describe('the designer', () => {
  it('groups the player title and message under "What players see" and shows refusals there', async () => {
    const refusal = "Names recipe 'Harewood A plain': players would know what they hear"
    const { sent } = fakeServer(
      on('GET', '/recipes', () => ({ body: { recipes: [recipe()] } })),
      on('PATCH', '/sessions/9', () => ({
        status: 422,
        body: {
          error: {
            code: 'validation_failed',
            message: 'This design cannot be run as it is',
            fields: { playerTitle: [refusal] },
          },
        },
      })),
    )
    const w = mount(SessionDesignForm, { props: { session: session() }, attachTo: document.body })
    await flushPromises()

    const group = w.find('[data-test=player-words]')
    await w.find('form').trigger('submit')
    await flushPromises()

    expect(group.find('legend').text()).toBe('What players see')
    expect(group.text()).toMatch(/Recipe names, version labels and construction words/)
    expect(itemLabelled('Name (staff only)')).toBeDefined()
    const title = itemLabelled('Player title')!
    expect(group.element.contains(title)).toBe(true)
    expect(group.element.contains(itemLabelled('Player message')!)).toBe(true)
    expect(title.querySelector('input')!.value).toBe('Strings to try at home')
    expect(title.textContent).toContain(refusal)
    const patch = sent.find((r) => r.method === 'PATCH')!
    expect(patch.body).toMatchObject({
      playerTitle: 'Strings to try at home',
      playerMessage: 'Play each set for two days.',
    })
    expect(patch.body).not.toHaveProperty('instructions')
  })
})

describe('the play-test printouts', () => {
  const sheet: Sheet = {
    playerTitle: 'Strings to try at home',
    caution: 'Fit strings with eye protection and bring them up to pitch slowly.',
    players: [
      {
        playerCode: 'P-014',
        sets: [
          { code: 417, position: 1, url: 'http://x/p/t?set=417', qrSvg: '<svg></svg>' },
          { code: 862, position: 2, url: 'http://x/p/t?set=862', qrSvg: '<svg></svg>' },
        ],
      },
    ],
  }
  const packing: PackingList = {
    sessionName: 'Harewood A plain vs Harewood A heavy',
    players: [
      {
        playerCode: 'P-014',
        playerName: 'Ines Example',
        lines: [
          { code: 417, position: 1, recipeName: 'Harewood A plain' },
          { code: 862, position: 2, recipeName: 'Harewood A heavy' },
        ],
      },
    ],
  }

  it('keep recipes and staff names off the labels, on a packing list printed apart', async () => {
    fakeServer(
      on('GET', '/sessions/9/labels', () => ({ body: sheet })),
      on('GET', '/sessions/9/packing-list', () => ({ body: packing })),
    )
    const w = mount(LabelSheet, { props: { sessionId: 9 } })
    await flushPromises()

    const labels = w.find('[data-test=labels]')
    const list = w.find('[data-test=packing-list]')
    expect(labels.text()).toContain('Strings to try at home')
    expect(labels.text()).toContain('417')
    expect(labels.text()).toContain('eye protection')
    for (const secret of ['Harewood', 'Ines Example', 'Staff only'])
      expect(labels.text()).not.toContain(secret)
    expect(labels.element.contains(list.element)).toBe(false)
    expect(list.text()).toContain('Staff only — keep away from players')
    expect(list.text()).toContain('Harewood A heavy')
    expect(w.find('[data-test=print-labels]').text()).toBe('Print the labels')
    expect(w.find('[data-test=print-packing]').text()).toContain('packing list (staff only)')
  })
})
