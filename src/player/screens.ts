import type { PlayerTrialView, TrialAnswer } from '@shared/schemas/rating'

/** Trials answered together: the clips of one matched set share a screen in attribute rating. */
export interface TrialScreen {
  screen: number
  trials: PlayerTrialView[]
}

/** Screens in the player's order: a screen comes where its first trial comes. */
export function groupScreens(trials: readonly PlayerTrialView[]): TrialScreen[] {
  const byNumber = new Map<number, TrialScreen>()
  const screens: TrialScreen[] = []
  for (const t of trials) {
    let s = byNumber.get(t.screen)
    if (!s) {
      s = { screen: t.screen, trials: [] }
      byNumber.set(t.screen, s)
      screens.push(s)
    }
    s.trials.push(t)
  }
  return screens
}

/** A trial is answered when its answer is complete enough to go on. */
export function isComplete(
  answer: TrialAnswer | undefined,
  attributeKeys: readonly string[],
): boolean {
  if (!answer) return false
  switch (answer.kind) {
    case 'rating':
    case 'playtest':
      return attributeKeys.every((k) => typeof answer.values[k] === 'number')
    case 'pair':
      return attributeKeys.every((k) => typeof answer.more[k] === 'number')
    case 'triangle':
      return typeof answer.odd === 'number'
  }
}

/** Where a reopened link resumes: the first screen with a trial still to answer. */
export function firstOpenScreen(
  screens: readonly TrialScreen[],
  answers: ReadonlyMap<number, TrialAnswer>,
  attributeKeys: readonly string[],
): number {
  const i = screens.findIndex((s) =>
    s.trials.some((t) => !isComplete(answers.get(t.index), attributeKeys)),
  )
  return i === -1 ? screens.length : i
}
