import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { mount } from '@vue/test-utils'
import ProvenanceLine from '@/components/findings/ProvenanceLine.vue'
import { provenanceLine } from '@/components/findings/provenance'
import { reportTime } from '@/components/findings/format'

// The line is read against fixed clock times, so the time zone is pinned (Node reads TZ anew).
beforeEach(() => vi.stubEnv('TZ', 'UTC'))
afterEach(() => vi.unstubAllEnvs())

describe('what the findings were computed from', () => {
  it('reads as the record-keeping issue words it, action names in plain words', () => {
    // Expected text: the example line of the record-keeping issue for the findings page.
    expect(
      provenanceLine({
        answers: 312,
        players: 12,
        excluded: 1,
        headphoneExcluded: 0,
        lastAnswerAt: '2026-12-02T14:03:00.000Z',
        lastChange: { action: 'findings.player_excluded', at: '2026-12-02T14:10:00.000Z' },
      }),
    ).toBe(
      'Computed from 312 answers of 12 players, 1 excluded; last answer 2 Dec 2026 14:03; ' +
        'last change: player excluded, 2 Dec 2026 14:10',
    )
  })

  it('says so when nothing was answered and nothing changed, in the singular where it is one', () => {
    expect(
      provenanceLine({
        answers: 0,
        players: 0,
        excluded: 0,
        headphoneExcluded: 0,
        lastAnswerAt: null,
        lastChange: null,
      }),
    ).toBe('No answers yet')
    expect(
      provenanceLine({
        answers: 1,
        players: 1,
        excluded: 0,
        headphoneExcluded: 0,
        lastAnswerAt: '2026-11-30T09:05:00.000Z',
        lastChange: { action: 'session.opened', at: '2026-11-29T08:00:00.000Z' },
      }),
    ).toBe(
      'Computed from 1 answer of 1 player, none excluded; last answer 30 Nov 2026 09:05; ' +
        'last change: session opened, 29 Nov 2026 08:00',
    )
  })

  it('says how many of the excluded were left out for a failed headphone check', () => {
    const line = provenanceLine({
      answers: 40,
      players: 5,
      excluded: 3,
      headphoneExcluded: 2,
      lastAnswerAt: null,
      lastChange: null,
    })
    expect(line).toBe(
      'Computed from 40 answers of 5 players, 3 excluded (2 for a failed headphone check)',
    )
  })

  it('writes no audit code, even for an action it has no words for yet', () => {
    const line = provenanceLine({
      answers: 5,
      players: 2,
      excluded: 0,
      headphoneExcluded: 0,
      lastAnswerAt: null,
      lastChange: { action: 'session.time_point_added', at: '2026-11-29T08:00:00.000Z' },
    })
    expect(line).toContain('last change: time point added')
    expect(line).not.toMatch(/session\.|_/)
  })

  it('gives times in the reader’s own zone', () => {
    // Japan keeps UTC+9 all year (IANA time zone database, Asia/Tokyo): 16:10 UTC is 01:10 there,
    // on the next day.
    vi.stubEnv('TZ', 'Asia/Tokyo')
    expect(reportTime('2026-12-02T16:10:00.000Z')).toBe('3 Dec 2026 01:10')
    vi.stubEnv('TZ', 'UTC')
    expect(reportTime('2026-12-02T16:10:00.000Z')).toBe('2 Dec 2026 16:10')
  })

  it('is shown as one line of the page, printed with it', () => {
    const w = mount(ProvenanceLine, {
      props: {
        provenance: {
          answers: 18,
          players: 3,
          excluded: 0,
          headphoneExcluded: 0,
          lastAnswerAt: '2026-12-01T01:48:00.000Z',
          lastChange: { action: 'session.closed', at: '2026-12-01T02:00:00.000Z' },
        },
      },
    })
    const el = w.find('[data-test=provenance]')
    expect(el.text()).toBe(
      'Computed from 18 answers of 3 players, none excluded; last answer 1 Dec 2026 01:48; ' +
        'last change: session closed, 1 Dec 2026 02:00',
    )
    expect(el.classes()).not.toContain('no-print')
  })
})
