import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils'
import { createPinia } from 'pinia'
import TrialStep from '@/components/player/TrialStep.vue'
import { FORMAT_SCREENS } from '@/player/formatScreens'
import { groupScreens } from '@/player/screens'
import { STRING_FITTING_CAUTION } from '@shared/cautions'
import {
  trialAnswer,
  type PlayerPlanView,
  type PlayerTrialView,
  type TrialAnswer,
} from '@shared/schemas/rating'
import { SESSION_FORMATS, type SessionFormat } from '@shared/schemas/sessions'

// Expectations come from the product brief (shared/DESIGN.md: §5 a rating session begins with
// consent, a headphone check and a comfortable level; §6 a play-test rates coded physical sets
// and the string-fitting caution is shown where strings go on under tension) and from the
// shared answer schema the server checks every saved answer against (shared/schemas/rating.ts).

const clip = (code: number) => ({
  code,
  audioUrl: `/api/player/audio/r${code}`,
})
const trialOf = (kind: SessionFormat, index: number, codes: number[]): PlayerTrialView => ({
  index,
  kind,
  screen: index,
  clips: codes.map(clip),
  picture: kind === 'playtest' ? null : { duration: 4, min: [], max: [] },
  setCode: kind === 'playtest' ? 417 : null,
})
const planOf = (format: SessionFormat, trials: PlayerTrialView[]): PlayerPlanView => ({
  playerTitle: 'Winter listening',
  format,
  playerMessage: '',
  deadline: '2027-01-31',
  cautions: [],
  attributes: [
    { key: 'warmth', name: 'Warmth', low: 'cool', high: 'warm' },
    { key: 'focus', name: 'Focus', low: 'diffuse', high: 'focused' },
  ],
  allowNoPreference: true,
  trials,
})

let wrapper: VueWrapper | null = null
afterEach(() => {
  wrapper?.unmount()
  wrapper = null
})

function show(format: SessionFormat, trials: PlayerTrialView[]) {
  wrapper = mount(TrialStep, {
    props: {
      screen: groupScreens(trials)[0],
      plan: planOf(format, trials),
      answers: new Map<number, TrialAnswer>(),
      disabled: false,
      colours: { wave: '#777', progress: '#333', cursor: '#000', region: '#ccc4' },
    },
    global: { plugins: [createPinia()] },
  })
  return wrapper
}

/** Every answer the screen sent, checked against the schema the server applies. */
function sent(w: VueWrapper): [number, TrialAnswer][] {
  return (w.emitted('answer') ?? []).map(([index, answer]) => {
    expect(trialAnswer.safeParse(answer).success).toBe(true)
    return [index as number, answer as TrialAnswer]
  })
}

describe('player screens per session format', () => {
  it('give every format a session can have a screen', () => {
    expect(Object.keys(FORMAT_SCREENS).sort()).toEqual([...SESSION_FORMATS].sort())
  })

  it('ask for the headphone check and the level before listening trials only', () => {
    expect(FORMAT_SCREENS.rating.listening).toBe(true)
    expect(FORMAT_SCREENS.pair.listening).toBe(true)
    expect(FORMAT_SCREENS.triangle.listening).toBe(true)
    expect(FORMAT_SCREENS.playtest.listening).toBe(false)
  })

  it('rating: every clip of the matched set gets its own scales, saved under its trial', async () => {
    const w = show('rating', [
      { ...trialOf('rating', 3, [212]), screen: 1 },
      { ...trialOf('rating', 4, [305]), screen: 1 },
    ])
    await flushPromises()
    expect(w.findAll('[data-test="line-scale"]')).toHaveLength(4)
    await w.find('[data-test="rate-305"] input[data-attribute="focus"]').setValue('70')
    expect(sent(w)).toEqual([[4, { kind: 'rating', values: { focus: 70 } }]])
  })

  it('pair: the preference, with "no preference" where the session allows it', async () => {
    const w = show('pair', [trialOf('pair', 2, [118, 640])])
    await flushPromises()
    const choices = w.findAll('[data-test="preference"] input[type="radio"]')
    expect(choices).toHaveLength(3)
    await choices[2].setValue(true)
    expect(sent(w)).toEqual([[2, { kind: 'pair', preferred: null, more: {} }]])
  })

  it('triangle: one forced choice among the three coded samples', async () => {
    const w = show('triangle', [trialOf('triangle', 5, [731, 254, 968])])
    await flushPromises()
    const choices = w.findAll('[data-test="odd-one"] input[type="radio"]')
    expect(choices).toHaveLength(3)
    await choices[1].setValue(true)
    expect(sent(w)).toEqual([[5, { kind: 'triangle', odd: 254 }]])
  })

  it('play-test: the set code, the string-fitting caution and no listening controls', async () => {
    const w = show('playtest', [trialOf('playtest', 0, [])])
    await flushPromises()
    expect(w.find('[data-test="set-code"]').text()).toBe('417')
    expect(w.text()).toContain(STRING_FITTING_CAUTION)
    expect(w.find('[data-test="clip-deck"]').exists()).toBe(false)
  })
})
