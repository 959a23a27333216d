import type { Component, ComponentInstance } from 'vue'
import type { PlayerPlanView, TrialAnswer } from '@shared/schemas/rating'
import type { SessionFormat } from '@shared/schemas/sessions'
import PairScreen from '@/components/player/PairScreen.vue'
import PlaytestScreen from '@/components/player/PlaytestScreen.vue'
import RatingScreen from '@/components/player/RatingScreen.vue'
import TriangleScreen from '@/components/player/TriangleScreen.vue'
import type { WaveColours } from '@/components/player/types'
import type { TrialScreen } from './screens'

/** Everything a screen may need; each format's entry hands its screen the part it uses. */
export interface ScreenContext {
  screen: TrialScreen
  plan: PlayerPlanView
  answers: ReadonlyMap<number, TrialAnswer>
  disabled: boolean
  colours: WaveColours
}

export interface FormatScreen {
  /** Emits `answer` with the arguments of an AnswerHandler. */
  component: Component
  props: (c: ScreenContext) => Record<string, unknown>
  /** Listening formats check the headphones and set the level before the first trial. */
  listening: boolean
}

/** Ties a screen to the props it takes, so an entry that forgets one does not compile. */
function entry<C extends Component>(
  component: C,
  props: (c: ScreenContext) => ComponentInstance<C>['$props'],
  listening = true,
): FormatScreen {
  return { component, props: props as FormatScreen['props'], listening }
}

const first = (c: ScreenContext) => c.screen.trials[0]

/**
 * The player's screen for each session format. The screens are part of the player page's
 * own bundle, as a player must not wait for code between trials.
 */
export const FORMAT_SCREENS: Record<SessionFormat, FormatScreen> = {
  rating: entry(RatingScreen, (c) => ({
    trials: c.screen.trials,
    attributes: c.plan.attributes,
    answers: c.answers,
    disabled: c.disabled,
    colours: c.colours,
  })),
  pair: entry(PairScreen, (c) => ({
    trial: first(c),
    attributes: c.plan.attributes,
    allowNoPreference: c.plan.allowNoPreference,
    answer: c.answers.get(first(c).index),
    disabled: c.disabled,
    colours: c.colours,
  })),
  triangle: entry(TriangleScreen, (c) => ({
    trial: first(c),
    answer: c.answers.get(first(c).index),
    disabled: c.disabled,
    colours: c.colours,
  })),
  playtest: entry(
    PlaytestScreen,
    (c) => ({
      trial: first(c),
      attributes: c.plan.attributes,
      answer: c.answers.get(first(c).index),
      disabled: c.disabled,
    }),
    false,
  ),
}
