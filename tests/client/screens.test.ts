import { describe, expect, it } from 'vitest'
import type { PlayerTrialView, TrialAnswer } from '@shared/schemas/rating'
import { firstOpenScreen, groupScreens, isComplete } from '@/player/screens'

const trial = (index: number, screen: number): PlayerTrialView => ({
  index,
  kind: 'rating',
  screen,
  clips: [{ code: 100 + index, audioUrl: `/a/${index}` }],
  picture: { duration: 3, min: [], max: [] },
  setCode: null,
})
const KEYS = ['brightness', 'warmth']
const full: TrialAnswer = { kind: 'rating', values: { brightness: 10, warmth: 80 } }
const half: TrialAnswer = { kind: 'rating', values: { brightness: 10 } }

describe('trial screens', () => {
  it('put trials sharing a screen number together, in the order the player meets them', () => {
    const screens = groupScreens([trial(0, 0), trial(1, 0), trial(2, 0), trial(3, 1), trial(4, 2)])
    expect(screens.map((s) => [s.screen, s.trials.map((t) => t.index)])).toEqual([
      [0, [0, 1, 2]],
      [1, [3]],
      [2, [4]],
    ])
  })

  it('keep a screen where its first trial stands even if numbers are not in order', () => {
    const screens = groupScreens([trial(0, 5), trial(1, 2), trial(2, 5)])
    expect(screens.map((s) => s.screen)).toEqual([5, 2])
    expect(screens[0].trials.map((t) => t.index)).toEqual([0, 2])
  })

  it('count a rating as answered only when every scale has been moved', () => {
    expect(isComplete(full, KEYS)).toBe(true)
    expect(isComplete(half, KEYS)).toBe(false)
    expect(isComplete(undefined, KEYS)).toBe(false)
    expect(isComplete({ kind: 'triangle', odd: 101 }, [])).toBe(true)
    expect(isComplete({ kind: 'pair', preferred: null, more: { warmth: 3 } }, ['warmth'])).toBe(
      true,
    )
    expect(isComplete({ kind: 'pair', preferred: 3, more: {} }, ['warmth'])).toBe(false)
  })

  it('resume at the first screen with anything left to answer', () => {
    const screens = groupScreens([trial(0, 0), trial(1, 0), trial(2, 1), trial(3, 2)])
    const answers = new Map<number, TrialAnswer>([
      [0, full],
      [1, full],
      [2, half],
    ])
    expect(firstOpenScreen(screens, answers, KEYS)).toBe(1)
    answers.set(2, full)
    expect(firstOpenScreen(screens, answers, KEYS)).toBe(2)
    answers.set(3, full)
    expect(firstOpenScreen(screens, answers, KEYS)).toBe(3)
  })
})
