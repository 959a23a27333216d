import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { NMessageProvider } from 'naive-ui'
import InvitationsPanel from '@/components/InvitationsPanel.vue'
import type { InvitationRow, RemindAllResult, SessionDetail } from '@shared/schemas/sessions'
import { fakeServer, on } from './fakeServer'

// The panel says what the server's mail throttles decided: a player mailed within the reminder
// gap cannot be reminded from the row, and "remind everyone" reports how many it left out and
// why, in the words the product owner asked for ("n reminded, m skipped (… last 12 h)").

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

const HOUR = 3_600_000
const at = (ms: number) => new Date(Date.now() + ms).toISOString()

const session = {
  id: 7,
  name: 'Harewood A compound weight',
  format: 'pair',
  status: 'open',
  deadline: at(10 * 24 * HOUR).slice(0, 10),
  recipeCount: 2,
  invitedCount: 3,
  doneCount: 0,
  timePointLabel: null,
  parentSessionId: null,
  createdBy: 'Dev',
  createdById: 1,
  createdAt: at(-48 * HOUR),
  purpose: '',
  recipeIds: [1, 2],
  clipSets: [],
  attributes: [],
  duplicates: 0,
  allowNoPreference: false,
  adjustment: 'holm',
  targetDifference: null,
  playerTitle: 'Evening listening',
  playerMessage: '',
  reminderDaysBefore: null,
  seed: 'x',
  locked: true,
  answersCount: 0,
  trialCount: 4,
  warnings: [],
  recordProblem: null,
  sameTakeWarnings: [],
  sameTakeAccepted: null,
  recipes: [],
  timePoints: [],
  openedAt: at(-48 * HOUR),
  closedAt: null,
  revision: 2,
} satisfies SessionDetail

function invitation(over: Partial<InvitationRow>): InvitationRow {
  return {
    id: 1,
    sessionId: 7,
    playerId: 1,
    playerCode: 'P-101',
    playerName: 'Mira Testbow',
    playerEmail: 'mira@example.test',
    status: 'invited',
    invitedAt: at(-30 * HOUR),
    lastSentAt: at(-30 * HOUR),
    openedAt: null,
    startedAt: null,
    completedAt: null,
    revokedAt: null,
    lastRemindedAt: null,
    remindersSent: 0,
    nextReminderAt: null,
    nextResendAt: null,
    answered: 0,
    trialCount: 4,
    headphoneCheck: null,
    ...over,
  }
}

const recentlyReminded = invitation({
  id: 1,
  playerCode: 'P-101',
  lastRemindedAt: at(-2 * HOUR),
  remindersSent: 1,
  nextReminderAt: at(10 * HOUR),
})
const due = invitation({ id: 2, playerId: 2, playerCode: 'P-102' })

async function show(rows: InvitationRow[], remindAll?: RemindAllResult) {
  const server = fakeServer(
    on('GET', '/sessions/7/invitations', () => ({ body: { invitations: rows } })),
    on('POST', '/sessions/7/remind', () => ({ body: remindAll })),
  )
  const Page = defineComponent(
    () => () => h(NMessageProvider, () => h(InvitationsPanel, { session, canEdit: true })),
  )
  const w = mount(Page, { attachTo: document.body })
  await flushPromises()
  return { w, server }
}

const rowOf = (code: string) =>
  [...document.querySelectorAll('[data-test=invitations-table] tbody tr')].find((tr) =>
    tr.textContent?.includes(code),
  )!
const remindIn = (code: string) =>
  rowOf(code).querySelector<HTMLButtonElement>('[data-test=remind]')!
const pause = (ms: number) => new Promise((r) => setTimeout(r, ms))

describe('the invitations panel', () => {
  it('shows when a row was last reminded and holds its remind button until the gap has passed', async () => {
    await show([recentlyReminded, due])

    expect(rowOf('P-101').textContent).toContain('1, last ')
    expect(rowOf('P-101').textContent).toContain('Next reminder after ')
    expect(remindIn('P-101').disabled).toBe(true)
    expect(rowOf('P-102').textContent).not.toContain('Next reminder after')
    expect(remindIn('P-102').disabled).toBe(false)

    remindIn('P-101').parentElement!.dispatchEvent(new MouseEvent('mouseenter'))
    await pause(250)
    await flushPromises()
    expect(document.body.textContent).toContain(
      'This player was mailed recently; the next reminder can go after',
    )
  })

  it('reports what "remind everyone" did: reminded, skipped as recent, held back by the cap', async () => {
    const { server } = await show([recentlyReminded, due], {
      reminded: 1,
      skippedRecent: 1,
      heldBack: 0,
      reminderGapHours: 12,
      moreAfter: null,
    })

    document.querySelector<HTMLButtonElement>('[data-test=remind-all]')!.click()
    await flushPromises()
    await pause(50)

    expect(server.sent.some((r) => r.method === 'POST' && r.path === '/sessions/7/remind')).toBe(
      true,
    )
    expect(document.body.textContent).toContain(
      '1 reminded, 1 skipped (invited or reminded in the last 12 h)',
    )
  })

  it('holds "remind everyone" when everyone not done was mailed within the gap', async () => {
    await show([recentlyReminded, invitation({ id: 3, playerId: 3, status: 'done' })])

    expect(document.querySelector<HTMLButtonElement>('[data-test=remind-all]')!.disabled).toBe(true)
  })
})
