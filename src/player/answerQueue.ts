import type { SaveAnswerResult, TrialAnswer } from '@shared/schemas/rating'

// Answers wait here until the server has them. The queue lives in localStorage under the link's
// token, so a dropped connection, a closed tab or a flat battery loses nothing; the server's
// save is keyed by invitation and trial, so sending an answer again never counts it twice.

export type SaveStatus = 'idle' | 'saved' | 'saving' | 'offline' | 'closed' | 'failed'

export interface QueueState {
  status: SaveStatus
  /** Answers not yet stored on the server. */
  waiting: number
  /** Why saving stopped (session closed, answer refused), in the server's words. */
  message: string | null
  last: SaveAnswerResult | null
}

export type SendAnswer = (trialIndex: number, answer: TrialAnswer) => Promise<SaveAnswerResult>

interface Entry {
  trialIndex: number
  answer: TrialAnswer
  /** Bumped on every change, so a reply for an older version does not clear a newer one. */
  version: number
  dueAt: number
}

export const queueKey = (token: string) => `ringdown.answers.${token}`

/** Waits between retries while the server cannot be reached; the last one repeats. */
export const RETRY_DELAYS_MS = [1000, 2000, 4000, 8000, 15000]

function errorStatus(err: unknown): number {
  const status = (err as { status?: unknown } | null)?.status
  return typeof status === 'number' ? status : 0
}

function errorCode(err: unknown): string | null {
  const code = (err as { code?: unknown } | null)?.code
  return typeof code === 'string' ? code : null
}

/**
 * Worth trying again: no connection, a server hiccup, too many requests at once, or storage the
 * server cannot write to for now (503 `unavailable`: full, read-only or busy; nothing was saved).
 */
const transient = (status: number) => status === 0 || status === 429 || status >= 500

/**
 * The link can never save again: the session closed, its deadline passed, the invitation was
 * withdrawn (410), or the link is not a valid one. The server says so with the `invalid_token`
 * code; other refusals (a 409 asking for consent or the headphone check first) are not this.
 */
const linkIsOver = (status: number, code: string | null) =>
  status === 410 || code === 'invalid_token'

export class AnswerQueue {
  private entries = new Map<number, Entry>()
  private timer: ReturnType<typeof setTimeout> | null = null
  private sending = false
  private failures = 0
  private stopped = false
  private version = 0
  state: QueueState = { status: 'idle', waiting: 0, message: null, last: null }

  constructor(
    private readonly token: string,
    private readonly send: SendAnswer,
    private readonly onState: (s: QueueState) => void = () => {},
    private readonly storage: Storage | null = typeof localStorage === 'undefined'
      ? null
      : localStorage,
  ) {
    for (const e of this.read()) {
      this.entries.set(e.trialIndex, { ...e, version: ++this.version, dueAt: 0 })
    }
    if (this.entries.size) this.update({ status: 'saving' })
  }

  /** Answers given on this device and not yet confirmed, newest per trial. */
  pending(): Map<number, TrialAnswer> {
    return new Map([...this.entries.values()].map((e) => [e.trialIndex, e.answer]))
  }

  /** Stores the answer at once and sends it after `delayMs` (sliders wait for the drag to end). */
  enqueue(trialIndex: number, answer: TrialAnswer, delayMs = 0): void {
    if (this.stopped) return
    this.entries.set(trialIndex, {
      trialIndex,
      answer,
      version: ++this.version,
      dueAt: Date.now() + delayMs,
    })
    this.persist()
    if (this.state.status !== 'offline') this.update({ status: 'saving' })
    else this.update({})
    this.schedule()
  }

  /** Sends what is due now, e.g. when the browser says it is back online. */
  retryNow(): void {
    this.failures = 0
    for (const e of this.entries.values()) e.dueAt = Math.min(e.dueAt, Date.now())
    this.schedule(0)
  }

  /** Sends everything at once, debounced or not: before leaving a screen. */
  flushNow(): void {
    for (const e of this.entries.values()) e.dueAt = 0
    this.schedule(0)
  }

  dispose(): void {
    if (this.timer) clearTimeout(this.timer)
    this.timer = null
    this.stopped = true
  }

  private schedule(delay?: number) {
    if (this.stopped || this.sending) return
    if (this.timer) clearTimeout(this.timer)
    this.timer = null
    if (!this.entries.size) return
    const soonest = Math.min(...[...this.entries.values()].map((e) => e.dueAt))
    const wait = delay ?? Math.max(0, soonest - Date.now())
    this.timer = setTimeout(() => {
      this.timer = null
      void this.sendDue()
    }, wait)
  }

  private async sendDue(): Promise<void> {
    if (this.stopped || this.sending) return
    const now = Date.now()
    const due = [...this.entries.values()]
      .filter((e) => e.dueAt <= now)
      .sort((a, b) => a.trialIndex - b.trialIndex)[0]
    if (!due) return this.schedule()
    this.sending = true
    try {
      const result = await this.send(due.trialIndex, due.answer)
      this.failures = 0
      if (this.entries.get(due.trialIndex)?.version === due.version) {
        this.entries.delete(due.trialIndex)
        this.persist()
      }
      this.update({
        status: this.entries.size ? 'saving' : 'saved',
        message: null,
        last: result,
      })
    } catch (err) {
      const status = errorStatus(err)
      const message = (err as Error)?.message ?? 'The answer could not be saved.'
      // A conflict is a step the server wants first: the answers keep waiting, in its words.
      const conflict = status === 409 && !linkIsOver(status, errorCode(err))
      if (transient(status) || conflict) {
        const wait = RETRY_DELAYS_MS[Math.min(this.failures, RETRY_DELAYS_MS.length - 1)]
        this.failures++
        this.sending = false
        this.update({
          status: status === 0 ? 'offline' : 'saving',
          message: conflict ? message : null,
        })
        return this.schedule(wait)
      }
      if (linkIsOver(status, errorCode(err))) {
        // The session has closed: nothing waiting can ever be stored, so stop and say why.
        this.entries.clear()
        this.persist()
        this.stopped = true
        this.sending = false
        this.update({ status: 'closed', message })
        return
      }
      // The server refused this answer itself; keeping it would block every later one.
      if (this.entries.get(due.trialIndex)?.version === due.version) {
        this.entries.delete(due.trialIndex)
        this.persist()
      }
      this.update({ status: 'failed', message })
    } finally {
      this.sending = false
    }
    this.schedule()
  }

  private update(patch: Partial<QueueState>) {
    this.state = { ...this.state, ...patch, waiting: this.entries.size }
    this.onState(this.state)
  }

  private read(): { trialIndex: number; answer: TrialAnswer }[] {
    try {
      const raw = this.storage?.getItem(queueKey(this.token))
      const parsed: unknown = raw ? JSON.parse(raw) : []
      return Array.isArray(parsed)
        ? parsed.filter(
            (e): e is { trialIndex: number; answer: TrialAnswer } =>
              typeof e?.trialIndex === 'number' && typeof e?.answer?.kind === 'string',
          )
        : []
    } catch {
      return []
    }
  }

  private persist() {
    try {
      const list = [...this.entries.values()].map(({ trialIndex, answer }) => ({
        trialIndex,
        answer,
      }))
      if (list.length) this.storage?.setItem(queueKey(this.token), JSON.stringify(list))
      else this.storage?.removeItem(queueKey(this.token))
    } catch {
      // Private browsing may refuse storage; the answers still go out from memory.
    }
  }
}
