import { computed, nextTick, onBeforeUnmount, onMounted, ref, shallowRef } from 'vue'
import type { PlayerPlanView, PlayerState, TrialAnswer } from '@shared/schemas/rating'
import type { PlayerLanding, SessionFormat } from '@shared/schemas/sessions'
import type { HeadphoneDeal } from '@shared/headphoneCheck'
import { playerApi } from '@/api/player'
import { AnswerQueue, type QueueState } from '@/player/answerQueue'
import { FORMAT_SCREENS } from '@/player/formatScreens'
import { firstOpenScreen, groupScreens, isComplete } from '@/player/screens'

export type Phase = 'loading' | 'problem' | 'welcome' | 'headphone' | 'level' | 'trials' | 'done'

const listens = (format: SessionFormat | undefined) => !format || FORMAT_SCREENS[format].listening

/**
 * A player's way through one invitation link: consent, the listening checks where the format
 * has them, then the trials screen by screen. Answers show at once and reach the server
 * through the queue, which keeps them across reloads and lost connections.
 * `setCode` narrows the trials to one coded set (a play-test label's QR code).
 */
export function usePlayerInvitation(token: string, setCode: number | null) {
  const phase = ref<Phase>('loading')
  const problem = ref('')
  const actionError = ref<string | null>(null)
  const busy = ref(false)
  const landing = shallowRef<PlayerLanding | null>(null)
  const state = shallowRef<PlayerState | null>(null)
  const plan = shallowRef<PlayerPlanView | null>(null)
  /** The attempt at the headphone check the server dealt, while the player takes it. */
  const headphoneDeal = shallowRef<HeadphoneDeal | null>(null)
  const answers = shallowRef(new Map<number, TrialAnswer>())
  const screenIndex = ref(0)
  const queueState = ref<QueueState>({ status: 'idle', waiting: 0, message: null, last: null })
  const queue = new AnswerQueue(
    token,
    (i, a) => playerApi.saveAnswer(token, i, a),
    (s) => (queueState.value = s),
  )

  const listening = computed(() => listens(plan.value?.format) && listens(landing.value?.format))
  const attributeKeys = computed(() => plan.value?.attributes.map((a) => a.key) ?? [])
  const trials = computed(() => {
    const all = plan.value?.trials ?? []
    return setCode === null ? all : all.filter((t) => t.setCode === setCode)
  })
  const screens = computed(() => groupScreens(trials.value))
  const screen = computed(() => screens.value[screenIndex.value] ?? null)
  const answeredCount = computed(
    () =>
      trials.value.filter((t) => isComplete(answers.value.get(t.index), attributeKeys.value))
        .length,
  )
  const closed = computed(
    () => queueState.value.status === 'closed' || state.value?.canAnswer === false,
  )
  const screenDone = computed(
    () =>
      !!screen.value &&
      screen.value.trials.every((t) => isComplete(answers.value.get(t.index), attributeKeys.value)),
  )

  function fail(err: unknown) {
    problem.value =
      (err as Error)?.message ||
      'This page could not be opened. Check your connection and try again.'
    phase.value = 'problem'
  }

  async function act(run: () => Promise<void>) {
    busy.value = true
    actionError.value = null
    try {
      await run()
    } catch (err) {
      actionError.value = (err as Error).message
    } finally {
      busy.value = false
    }
  }

  async function start() {
    try {
      landing.value = await playerApi.landing(token)
      state.value = await playerApi.state(token)
    } catch (err) {
      return fail(err)
    }
    if (!state.value.consentAt) {
      phase.value = 'welcome'
      return
    }
    await afterConsent().catch(fail)
  }

  async function afterConsent() {
    plan.value = await playerApi.plan(token)
    const merged = new Map(state.value!.answers.map((a) => [a.trialIndex, a.answer]))
    // Answers given here but not yet stored are newer than the server's copy.
    for (const [i, a] of queue.pending()) merged.set(i, a)
    answers.value = merged
    if (setCode !== null && !trials.value.length) {
      problem.value = `The set code ${setCode} is not one of yours in this session. Scan the label again, or open the link in your invitation.`
      phase.value = 'problem'
      return
    }
    // A check failed at every attempt allowed lets the player go on (the organisers see it).
    const check = state.value!.headphone?.status
    if (listening.value && check !== 'passed' && check !== 'failed') phase.value = 'headphone'
    else if (listening.value && !state.value!.levelSetAt) phase.value = 'level'
    else enterTrials()
  }

  function enterTrials() {
    screenIndex.value = firstOpenScreen(screens.value, answers.value, attributeKeys.value)
    phase.value = screenIndex.value >= screens.value.length ? 'done' : 'trials'
    void focusTitle()
  }

  const consent = () =>
    act(async () => {
      state.value = await playerApi.consent(token)
      await afterConsent()
    })

  const headphoneStart = () =>
    act(async () => {
      headphoneDeal.value = await playerApi.headphoneStart(token)
    })

  /** A pass goes straight on; a failure stays on the check, which explains what comes next. */
  const headphoneDone = (responses: number[]) =>
    act(async () => {
      const deal = headphoneDeal.value
      if (!deal) return
      state.value = await playerApi.headphone(token, deal.attempt, responses)
      headphoneDeal.value = null
      if (state.value.headphone?.passed) afterHeadphone()
    })

  /** On to the level (or the trials, when it was set before). */
  function afterHeadphone() {
    if (state.value?.levelSetAt) enterTrials()
    else phase.value = 'level'
  }

  const levelDone = () =>
    act(async () => {
      state.value = await playerApi.level(token)
      enterTrials()
    })

  function onAnswer(trialIndex: number, answer: TrialAnswer, delayMs = 0) {
    if (closed.value) return
    const next = new Map(answers.value)
    next.set(trialIndex, answer)
    answers.value = next
    queue.enqueue(trialIndex, answer, delayMs)
  }

  async function focusTitle() {
    await nextTick()
    window.scrollTo({ top: 0 })
    document.querySelector<HTMLElement>('[data-focus-title]')?.focus()
  }

  function go(delta: number) {
    queue.flushNow()
    screenIndex.value += delta
    if (screenIndex.value >= screens.value.length) phase.value = 'done'
    void focusTitle()
  }

  function review() {
    screenIndex.value = 0
    phase.value = 'trials'
    void focusTitle()
  }

  const online = () => queue.retryNow()
  onMounted(() => {
    window.addEventListener('online', online)
    void start()
  })
  onBeforeUnmount(() => {
    window.removeEventListener('online', online)
    queue.flushNow()
  })

  return {
    phase,
    problem,
    actionError,
    busy,
    landing,
    state,
    plan,
    answers,
    screenIndex,
    queueState,
    listening,
    trials,
    screens,
    screen,
    answeredCount,
    closed,
    screenDone,
    consent,
    headphoneDeal,
    headphoneStart,
    headphoneDone,
    afterHeadphone,
    levelDone,
    onAnswer,
    go,
    review,
  }
}
