import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import type { SaveAnswerResult, TrialAnswer } from '@shared/schemas/rating'
import { AnswerQueue, queueKey, RETRY_DELAYS_MS, type QueueState } from '@/player/answerQueue'
import { ApiError } from '@/api/client'

const TOKEN = 'tok-123'
const rating = (v: number): TrialAnswer => ({ kind: 'rating', values: { brightness: v } })
const ok = (): SaveAnswerResult => ({
  saved: true,
  duplicate: false,
  answered: 1,
  trialCount: 6,
  done: false,
})

/** A stand-in server: stores the last answer per trial, as the idempotent PUT does. */
function fakeServer() {
  const stored = new Map<number, TrialAnswer>()
  const calls: [number, TrialAnswer][] = []
  let offline = false
  let closed = false
  const send = vi.fn(async (i: number, a: TrialAnswer) => {
    calls.push([i, a])
    if (offline) throw new ApiError(0, 'network', 'The server cannot be reached.')
    if (closed) throw new ApiError(410, 'invalid_token', 'This session has closed.')
    stored.set(i, a)
    return ok()
  })
  return {
    stored,
    calls,
    send,
    goOffline: (v: boolean) => (offline = v),
    close: () => (closed = true),
  }
}

beforeEach(() => {
  vi.useFakeTimers()
  localStorage.clear()
})
afterEach(() => vi.useRealTimers())

describe('the answer queue', () => {
  it('sends an answer at once and reports Saved', async () => {
    const server = fakeServer()
    const states: QueueState[] = []
    const q = new AnswerQueue(TOKEN, server.send, (s) => states.push(s))
    q.enqueue(0, rating(40))
    expect(q.state.status).toBe('saving')
    await vi.runAllTimersAsync()
    expect(server.stored.get(0)).toEqual(rating(40))
    expect(q.state).toMatchObject({ status: 'saved', waiting: 0 })
    expect(localStorage.getItem(queueKey(TOKEN))).toBeNull()
  })

  it('debounces slider drags: only the value where the drag settles is sent', async () => {
    const server = fakeServer()
    const q = new AnswerQueue(TOKEN, server.send)
    for (const v of [10, 20, 30, 44]) {
      q.enqueue(2, rating(v), 400)
      await vi.advanceTimersByTimeAsync(100)
    }
    expect(server.send).not.toHaveBeenCalled()
    await vi.advanceTimersByTimeAsync(400)
    expect(server.calls).toEqual([[2, rating(44)]])
  })

  it('keeps answers in localStorage while offline, says how many wait, and sends them when back', async () => {
    const server = fakeServer()
    server.goOffline(true)
    const q = new AnswerQueue(TOKEN, server.send)
    q.enqueue(0, rating(1))
    q.enqueue(1, rating(2))
    q.enqueue(2, rating(3))
    await vi.advanceTimersByTimeAsync(10)
    expect(q.state).toMatchObject({ status: 'offline', waiting: 3 })
    expect(JSON.parse(localStorage.getItem(queueKey(TOKEN))!)).toHaveLength(3)

    // Retries back off while the connection stays down.
    const before = server.send.mock.calls.length
    await vi.advanceTimersByTimeAsync(RETRY_DELAYS_MS[0] + RETRY_DELAYS_MS[1] + 10)
    expect(server.send.mock.calls.length - before).toBe(2)

    server.goOffline(false)
    q.retryNow()
    await vi.runAllTimersAsync()
    expect([...server.stored.keys()].sort()).toEqual([0, 1, 2])
    expect(q.state).toMatchObject({ status: 'saved', waiting: 0 })
    expect(localStorage.getItem(queueKey(TOKEN))).toBeNull()
  })

  it('picks up what a closed tab left behind, and the newest answer per trial wins', async () => {
    const server = fakeServer()
    server.goOffline(true)
    const first = new AnswerQueue(TOKEN, server.send)
    first.enqueue(4, rating(10))
    first.enqueue(4, rating(90))
    first.dispose()

    server.goOffline(false)
    const reopened = new AnswerQueue(TOKEN, server.send)
    expect(reopened.pending().get(4)).toEqual(rating(90))
    reopened.flushNow()
    await vi.runAllTimersAsync()
    expect(server.stored.get(4)).toEqual(rating(90))
    expect(server.calls.filter(([i]) => i === 4).at(-1)).toEqual([4, rating(90)])
  })

  it('does not drop a newer answer given while an older one was on its way', async () => {
    let release: (() => void) | null = null
    const sent: TrialAnswer[] = []
    const send = vi.fn(async (_i: number, a: TrialAnswer) => {
      sent.push(a)
      if (sent.length === 1) await new Promise<void>((r) => (release = r))
      return ok()
    })
    const q = new AnswerQueue(TOKEN, send)
    q.enqueue(0, rating(10))
    await vi.advanceTimersByTimeAsync(1)
    q.enqueue(0, rating(70))
    release!()
    await vi.runAllTimersAsync()
    expect(sent).toEqual([rating(10), rating(70)])
    expect(q.state.waiting).toBe(0)
  })

  it('stops and says why once the session has closed', async () => {
    const server = fakeServer()
    server.close()
    const q = new AnswerQueue(TOKEN, server.send)
    q.enqueue(0, rating(5))
    await vi.runAllTimersAsync()
    expect(q.state).toMatchObject({ status: 'closed', message: 'This session has closed.' })
    q.enqueue(1, rating(6))
    await vi.runAllTimersAsync()
    expect(server.send).toHaveBeenCalledTimes(1)
    expect(localStorage.getItem(queueKey(TOKEN))).toBeNull()
  })

  it('keeps each link apart', () => {
    const a = new AnswerQueue('link-a', fakeServer().send)
    a.enqueue(0, rating(1), 10_000)
    const b = new AnswerQueue('link-b', fakeServer().send)
    expect(b.pending().size).toBe(0)
    expect(new AnswerQueue('link-a', fakeServer().send).pending().size).toBe(1)
  })
})
