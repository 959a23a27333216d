import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { mount } from '@vue/test-utils'
import HeadphoneCheck from '@/components/player/HeadphoneCheck.vue'
import type { PlayerHeadphone } from '@shared/schemas/rating'
import type { HeadphoneDeal } from '@shared/headphoneCheck'

// The check's screen between attempts: after a failure it explains what to put right and holds
// the retry back for the pause the server set, counting down on this device's clock; after a
// second failure it lets the player go on. The server deals and scores every attempt.

const failedOnce: PlayerHeadphone = {
  status: 'retry',
  correct: 3,
  trials: 6,
  passed: false,
  attempts: 1,
  retryInSeconds: 30,
}

const show = (props: {
  previous: PlayerHeadphone | null
  deal?: HeadphoneDeal | null
  busy?: boolean
}) => mount(HeadphoneCheck, { props: { deal: null, busy: false, ...props } })

beforeEach(() => vi.useFakeTimers({ now: new Date('2026-12-03T09:00:00Z') }))
afterEach(() => {
  vi.useRealTimers()
  localStorage.clear()
})

describe('the headphone check between attempts', () => {
  it('counts down the pause before a retry, then offers it', async () => {
    const w = show({ previous: failedOnce })
    const retry = () => w.get('button')
    const countdown = () => w.get('[data-test=headphone-countdown]').text()

    expect(w.get('[data-test=headphone-failed]').text()).toContain('3 of 6 right; 5 are needed')
    expect(w.text()).toMatch(/both sides of your headphones, the right way round/)
    expect(countdown()).toBe('You can try again in 30 seconds.')
    expect(retry().text()).toBe('Try the check again')
    expect(retry().attributes('disabled')).toBeDefined()

    await vi.advanceTimersByTimeAsync(10_000)
    expect(countdown()).toBe('You can try again in 20 seconds.')
    await vi.advanceTimersByTimeAsync(19_000)
    expect(countdown()).toBe('You can try again in 1 second.')
    expect(retry().attributes('disabled')).toBeDefined()
    await vi.advanceTimersByTimeAsync(1_000)
    expect(countdown()).toBe('You can try again now.')
    expect(retry().attributes('disabled')).toBeUndefined()

    await retry().trigger('click')
    expect(w.emitted('start')).toHaveLength(1)
  })

  it('starts the count again from a new figure, as after a reload', async () => {
    const w = show({ previous: { ...failedOnce, retryInSeconds: 0 } })
    expect(w.get('[data-test=headphone-countdown]').text()).toBe('You can try again now.')
    await w.setProps({ previous: { ...failedOnce, retryInSeconds: 12 } })
    expect(w.get('[data-test=headphone-countdown]').text()).toBe('You can try again in 12 seconds.')
  })

  it('lets the player go on after the second failure, without another try', async () => {
    const w = show({
      previous: { ...failedOnce, status: 'failed', attempts: 2, retryInSeconds: null },
    })

    expect(w.get('[data-test=headphone-flagged]').text()).toContain('did not pass this time either')
    expect(w.text()).not.toContain('Try the check again')
    await w.get('[data-test=headphone-go-on]').trigger('click')
    expect(w.emitted('proceed')).toHaveLength(1)
  })

  it('plays the dealt tones and sends back only the picks, one per set', async () => {
    // Test mode lets a set be answered without playing it (there is no audio device here).
    localStorage.setItem('ringdown.test', '1')
    const deal: HeadphoneDeal = {
      attempt: 2,
      trials: [
        { tones: ['quiet', 'reference', 'antiphase'] },
        { tones: ['reference', 'antiphase', 'quiet'] },
      ],
    }
    const w = show({ previous: failedOnce, deal })
    const picks = [0, 1]
    for (const [i, pick] of picks.entries()) {
      const trial = w.get('[data-test=headphone-trial]')
      expect(trial.text()).toContain(`Tone set ${i + 1} of 2`)
      await trial.findAll('input[type=radio]')[pick].setValue(true)
      await trial.findAll('button').at(-1)!.trigger('click')
    }

    expect(w.emitted('done')).toEqual([[[0, 1]]])
  })
})
