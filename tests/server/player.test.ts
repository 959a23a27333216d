import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { fixedClock } from '../../server/clock'
import { byteRange } from '../../server/http/sendAudio'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'
import {
  answerFor,
  giveAudio,
  invitedOf,
  passHeadphoneCheck,
  takeHeadphoneCheck,
  type Invited,
} from './playerFixtures'

const DAY = 86_400_000
const KEYS = ['brightness', 'bow_response', 'warmth']
const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-player-'))
let t: TestApp
let developer: Agent

beforeAll(async () => {
  t = await buildApp({ clock, config: { mediaDir } })
  developer = await signInAs(t.app, 'developer')
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

/** An open session with real audio and `players` invitations. */
async function study(format: string, players = 2, over: Record<string, unknown> = {}) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, format === 'triangle' ? 2 : 3, 2)
  await giveAudio(
    t.knex,
    mediaDir,
    clipSets.flatMap((s) => s.clipIds),
  )
  const { id } = await openStudy(developer, {
    name: `Player path ${format}`,
    format,
    recipeIds,
    clipSets: format === 'playtest' ? [] : clipSets,
    duplicates: 1,
    playerMessage: 'Listen in a quiet room.',
    deadline: isoDay(clock.now(), 7),
    ...over,
  })
  const playerIds = await addPlayers(t.knex, players)
  await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  await t.settle()
  return { id, invited: await invitedOf(t, id), recipeIds, clipSets }
}

const api = () => request(t.app)
const binary = (res: request.Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => done(null, Buffer.concat(chunks)))
}
const state = (token: string) => api().get('/api/player/state').set('X-Invitation-Token', token)
const plan = async (token: string) =>
  (await api().get('/api/player/plan').set('X-Invitation-Token', token)).body.plan
const put = (token: string, index: number, answer: unknown) =>
  api().put(`/api/player/answers/${index}`).send({ token, answer })
const answerRows = (invitationId: number) =>
  t.knex('answers').where({ invitation_id: invitationId }).orderBy('trial_index')

/** Consent, and the headphone check where the session is listened to: ready for the trials. */
async function consented(p: Invited) {
  await api().post('/api/player/consent').send({ token: p.token }).expect(200)
  const view = await plan(p.token)
  if (view.format !== 'playtest') await passHeadphoneCheck(t.app, p.token)
  return view
}

describe('the player path', () => {
  it('goes from welcome through consent, headphone and level checks to every trial and the end', async () => {
    const { invited } = await study('rating')
    const [p] = invited

    const first = await state(p.token)
    const early = await api().get('/api/player/plan').set('X-Invitation-Token', p.token)
    const consent = await api().post('/api/player/consent').send({ token: p.token })
    const consentedAt = clock.now().toISOString()
    const failed = await takeHeadphoneCheck(t, p.token, 3)
    // A retry waits out the pause after a failed check.
    clock.advance(30_000)
    const passed = await takeHeadphoneCheck(t, p.token, 1)
    const level = await api().post('/api/player/level').send({ token: p.token })

    expect(first.status).toBe(200)
    expect(first.body).toMatchObject({
      consentAt: null,
      headphone: null,
      answers: [],
      canAnswer: true,
    })
    expect(first.body.landing.status).toBe('opened')
    expect(first.headers['cache-control']).toBe('no-store')
    expect(early.status).toBe(409)
    expect(early.body.error).toMatchObject({
      code: 'conflict',
      message: 'Please give your consent first',
    })
    expect(consent.body.consentAt).toBe(consentedAt)
    expect(failed.body.headphone).toEqual({
      status: 'retry',
      correct: 3,
      trials: 6,
      passed: false,
      attempts: 1,
      retryInSeconds: 30,
    })
    expect(passed.body.headphone).toEqual({
      status: 'passed',
      correct: 5,
      trials: 6,
      passed: true,
      attempts: 2,
      retryInSeconds: null,
    })
    expect(level.body.levelSetAt).toBe(clock.now().toISOString())

    const view = await plan(p.token)
    expect(view.cautions[0]).toMatch(/hearing/)
    expect(view.trials).toHaveLength(3 * 2 + 1)
    clock.advance(60_000)
    const results = []
    for (const trial of view.trials)
      results.push((await put(p.token, trial.index, answerFor(trial, KEYS))).body)
    const inv = await t.knex('invitations').where({ id: p.id }).first()
    const end = await state(p.token)

    expect(results[0]).toEqual({
      saved: true,
      duplicate: false,
      answered: 1,
      trialCount: 7,
      done: false,
    })
    expect(results.at(-1)).toEqual({
      saved: true,
      duplicate: false,
      answered: 7,
      trialCount: 7,
      done: true,
    })
    expect(inv.started_at).toBe(clock.now().toISOString())
    expect(inv.completed_at).toBe(clock.now().toISOString())
    const checks = await t
      .knex('headphone_checks')
      .where({ invitation_id: p.id })
      .orderBy('attempt')
    expect(checks.map((c) => [c.attempt, c.correct, c.trials, Boolean(c.passed)])).toEqual([
      [1, 3, 6, false],
      [2, 5, 6, true],
    ])
    expect(end.body.landing).toMatchObject({ status: 'done', answered: 7, trialCount: 7 })
    expect(end.body.answers).toHaveLength(7)
  })

  it('groups the first showings of a matched set on one screen and keeps hidden repeats apart', async () => {
    const { invited } = await study('rating')
    const view = await consented(invited[0])
    const trials = view.trials as { screen: number; clips: { code: number; audioUrl: string }[] }[]
    const screens = new Map<number, number>()
    for (const tr of trials) screens.set(tr.screen, (screens.get(tr.screen) ?? 0) + 1)

    // 2 sets of 3 clips and 1 hidden repeat: 3 + 3 + 1 trials; a repeat never splits a set.
    expect([...screens.values()].sort()).toEqual([1, 3, 3])
    expect(trials.map((tr) => tr.screen)).toEqual(
      [...trials.map((tr) => tr.screen)].sort((a, b) => a - b),
    )
    const urls = trials.flatMap((tr) => tr.clips.map((c) => c.audioUrl))
    expect(new Set(urls).size).toBe(urls.length)
    for (const u of urls) expect(u).toMatch(/^\/api\/player\/audio\/[A-Za-z0-9_-]{24}$/)
    // A code and an address only; the screen's one picture is its set's, whatever is selected.
    expect(Object.keys(view.trials[0].clips[0]).sort()).toEqual(['audioUrl', 'code'])
    const picture = view.trials[0].picture
    expect(picture.max.length).toBe(600)
    expect(picture.duration).toBeGreaterThan(0.4)
    const firstScreen = view.trials.filter((tr: { screen: number }) => tr.screen === 0)
    for (const tr of firstScreen) expect(tr.picture).toEqual(picture)
    // The same addresses on every fetch, so a reopened link resumes with the same audio.
    expect((await plan(invited[0].token)).trials).toEqual(view.trials)
  })

  it('resumes at the first unanswered trial when the link is reopened', async () => {
    const { invited } = await study('pair')
    const p = invited[0]
    const view = await consented(p)
    for (const trial of view.trials.slice(0, 2))
      await put(p.token, trial.index, answerFor(trial, KEYS, 1))

    const res = await state(p.token)
    const answered = new Set(res.body.answers.map((a: { trialIndex: number }) => a.trialIndex))

    expect(res.body.answers).toEqual(
      view.trials
        .slice(0, 2)
        .map((trial: { index: number; kind: 'pair'; clips: { code: number }[] }) => ({
          trialIndex: trial.index,
          answer: answerFor(trial, KEYS, 1),
        })),
    )
    expect(view.trials.findIndex((tr: { index: number }) => !answered.has(tr.index))).toBe(2)
    expect(res.body.landing).toMatchObject({ status: 'in_progress', answered: 2 })
  })
})

describe('saving an answer', () => {
  it('counts the same answer sent twice once and says it was a duplicate', async () => {
    const { invited } = await study('rating')
    const p = invited[0]
    const trial = (await consented(p)).trials[0]
    const answer = answerFor(trial, KEYS)

    const once = await put(p.token, 0, answer)
    const twice = await put(p.token, 0, { kind: 'rating', values: { ...answer.values } })

    expect(once.body.duplicate).toBe(false)
    expect(twice.status).toBe(200)
    expect(twice.body).toMatchObject({ duplicate: true, answered: 1 })
    expect(await answerRows(p.id)).toHaveLength(1)
  })

  it('replaces an answer the player changed, still as one row', async () => {
    const { invited } = await study('rating')
    const p = invited[0]
    const trial = (await consented(p)).trials[0]
    await put(p.token, 0, answerFor(trial, KEYS))

    const changed = await put(p.token, 0, { kind: 'rating', values: { brightness: 90 } })
    const rows = await answerRows(p.id)

    expect(changed.body).toMatchObject({ duplicate: false, answered: 1 })
    expect(rows).toHaveLength(1)
    expect(JSON.parse(rows[0].payload).given).toEqual({
      kind: 'rating',
      values: { brightness: 90 },
    })
  })

  it('serves the doubled sample of a triangle as bytes of its own', async () => {
    const { invited } = await study('triangle', 1)
    const trial = (await consented(invited[0])).trials[0]
    const bodies = await Promise.all(
      trial.clips.map(async (c: { audioUrl: string }) => {
        const res = await api().get(c.audioUrl).buffer(true).parse(binary)
        expect(res.status).toBe(200)
        return (res.body as Buffer).toString('base64')
      }),
    )

    // Two of the three are one recording; still no two downloads may match.
    expect(new Set(bodies).size).toBe(3)
    expect(new Set(bodies.map((b) => b.length)).size).toBe(1)
  })

  it('stores one row when the same answer arrives many times at once', async () => {
    const { invited } = await study('triangle')
    const p = invited[0]
    const trial = (await consented(p)).trials.at(-1)
    const answer = answerFor(trial, [])

    const all = await Promise.all(
      Array.from({ length: 8 }, () => put(p.token, trial.index, answer)),
    )

    expect(all.map((r) => r.status)).toEqual(Array(8).fill(200))
    expect(all.filter((r) => !r.body.duplicate)).toHaveLength(1)
    expect(await answerRows(p.id)).toHaveLength(1)
  })

  it('keeps the truth behind the codes on the server and never sends it back', async () => {
    const { invited, recipeIds } = await study('pair', 1, { allowNoPreference: true })
    const p = invited[0]
    const trial = (await consented(p)).trials[0]

    const res = await put(p.token, 0, { kind: 'pair', preferred: trial.clips[1].code, more: {} })
    const none = await put(p.token, 1, { kind: 'pair', preferred: null, more: {} })
    const [row] = await answerRows(p.id)
    const stored = JSON.parse(row.payload)

    expect(res.status).toBe(200)
    expect(none.status).toBe(200)
    expect(Object.keys(res.body).sort()).toEqual([
      'answered',
      'done',
      'duplicate',
      'saved',
      'trialCount',
    ])
    expect(stored.given).toEqual({ kind: 'pair', preferred: trial.clips[1].code, more: {} })
    expect(stored.served.clips.map((c: { code: number }) => c.code)).toEqual(
      trial.clips.map((c: { code: number }) => c.code),
    )
    expect(recipeIds).toContain(stored.resolved.preferredRecipeId)
    expect(stored.resolved.preferredRecipeId).toBe(stored.served.clips[1].recipeId)
  })

  it('marks a triangle answer right or wrong against the odd sample', async () => {
    const { invited } = await study('triangle', 1)
    const p = invited[0]
    const view = await consented(p)
    for (const trial of view.trials)
      await put(p.token, trial.index, { kind: 'triangle', odd: trial.clips[0].code })
    const rows = (await answerRows(p.id)).map((r) => JSON.parse(r.payload))

    for (const r of rows) expect(r.resolved.correct).toBe(r.served.odd === 0)
    // Two samples are one recording: nothing in the view may point at the odd one. Clips carry
    // a code and an address only, and the picture is their set's: one per set, not per trial.
    for (const trial of view.trials)
      for (const c of trial.clips) expect(Object.keys(c).sort()).toEqual(['audioUrl', 'code'])
    const pictures = new Set(
      view.trials.map((tr: { picture: unknown }) => JSON.stringify(tr.picture)),
    )
    expect(pictures.size).toBeLessThanOrEqual(2)
  })

  it('takes play-test ratings for the coded set with a comment', async () => {
    const { invited } = await study('playtest', 1)
    const p = invited[0]
    const view = await consented(p)

    const res = await put(p.token, 0, answerFor(view.trials[0], KEYS))
    const stored = JSON.parse((await answerRows(p.id))[0].payload)

    expect(view.trials[0]).toMatchObject({
      kind: 'playtest',
      clips: [],
      setCode: expect.any(Number),
    })
    expect(res.status).toBe(200)
    expect(stored.served.setCode).toBe(view.trials[0].setCode)
  })
})

describe('bad answers', () => {
  let p: Invited
  let other: Invited
  let unchecked: Invited
  let trials: { index: number; kind: 'rating'; clips: { code: number }[] }[]
  beforeAll(async () => {
    const s = await study('rating', 3)
    ;[p, other, unchecked] = s.invited
    trials = (await consented(p)).trials
  })

  it.each([
    [
      'a value above the scale',
      0,
      { kind: 'rating', values: { brightness: 101 } },
      'answer.values.brightness',
    ],
    [
      'a value below the scale',
      0,
      { kind: 'rating', values: { brightness: -1 } },
      'answer.values.brightness',
    ],
    ['the wrong kind of answer', 0, { kind: 'triangle', odd: 123 }, 'answer.kind'],
    [
      'an attribute the session does not rate',
      0,
      { kind: 'rating', values: { sparkle: 50 } },
      'answer.values.sparkle',
    ],
    ['no value at all', 0, { kind: 'rating', values: {} }, 'answer.values'],
    [
      'a trial the player does not have',
      99,
      { kind: 'rating', values: { brightness: 50 } },
      'trialIndex',
    ],
    ['a negative trial', -1, { kind: 'rating', values: { brightness: 50 } }, 'trialIndex'],
  ])('refuses %s with 422 and stores nothing', async (_what, index, answer, field) => {
    const res = await put(p.token, index as number, answer)

    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('validation_failed')
    expect(Object.keys(res.body.error.fields)).toContain(field)
    expect(await answerRows(p.id)).toHaveLength(0)
  })

  it('refuses codes of another trial, such as one from a different set', async () => {
    const pair = await study('pair', 1)
    const q = pair.invited[0]
    const view = await consented(q)
    const foreign = view.trials.find(
      (tr: { clips: { code: number }[] }) =>
        !tr.clips.some((c) =>
          view.trials[0].clips.some((d: { code: number }) => d.code === c.code),
        ),
    )

    const res = await put(q.token, 0, { kind: 'pair', preferred: foreign.clips[0].code, more: {} })
    const noPreference = await put(q.token, 0, { kind: 'pair', preferred: null, more: {} })

    expect(res.status).toBe(422)
    expect(res.body.error.fields['answer.preferred'][0]).toMatch(/not one of this trial/)
    expect(noPreference.status).toBe(422)
    expect(await answerRows(q.id)).toHaveLength(0)
  })

  it('asks for consent before the first answer', async () => {
    const res = await put(other.token, 0, { kind: 'rating', values: { brightness: 50 } })

    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('Please give your consent first')
    expect(await answerRows(other.id)).toHaveLength(0)
  })

  it('refuses headphone picks that are not tone 1, 2 or 3, or fewer than the tones dealt', async () => {
    // A player who has not taken the check yet (the others passed it to reach the trials).
    const q = unchecked
    await api().post('/api/player/consent').send({ token: q.token }).expect(200)
    const dealt = await api().post('/api/player/headphone/start').send({ token: q.token })
    const { attempt } = dealt.body
    const outside = await api()
      .post('/api/player/headphone')
      .send({ token: q.token, attempt, responses: [0, 1, 2, 0, 1, 3] })
    const short = await api()
      .post('/api/player/headphone')
      .send({ token: q.token, attempt, responses: [0, 1, 2] })
    const selfScored = await api()
      .post('/api/player/headphone')
      .send({ token: q.token, correct: 6, trials: 6 })

    expect(dealt.status).toBe(200)
    expect(outside.status).toBe(422)
    expect(outside.body.error.fields.responses).toEqual(['Tone 1, 2 or 3'])
    expect(short.status).toBe(422)
    expect(short.body.error.fields.responses[0]).toBe('Answer all 6 sets of tones')
    expect(selfScored.status).toBe(422)
    const row = await t.knex('headphone_checks').where({ invitation_id: q.id }).first()
    expect(row.correct).toBeNull()
  })

  it('refuses a forged token with 400', async () => {
    const res = await put(`${p.token}x`, 0, answerFor(trials[0], KEYS))
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_token')
  })
})

describe('a link that no longer takes answers', () => {
  async function answeredOnce() {
    const s = await study('rating', 1, { deadline: isoDay(clock.now(), 2) })
    const p = s.invited[0]
    const view = await consented(p)
    await put(p.token, 0, answerFor(view.trials[0], KEYS))
    const audio = view.trials[0].clips[0].audioUrl as string
    return { ...s, p, view, audio }
  }

  it('answers 410 after revocation, stores nothing and stops the audio', async () => {
    const { p, view, audio } = await answeredOnce()
    await developer.post(`/api/invitations/${p.id}/revoke`).expect(200)

    const res = await put(p.token, 1, answerFor(view.trials[1], KEYS))
    const replay = await put(p.token, 0, answerFor(view.trials[0], KEYS))

    expect(res.status).toBe(410)
    expect(res.body.error).toMatchObject({
      code: 'invalid_token',
      message: expect.stringMatching(/withdrawn/),
    })
    expect(replay.status).toBe(410)
    expect((await state(p.token)).status).toBe(410)
    expect((await api().get(audio)).status).toBe(410)
    expect(await answerRows(p.id)).toHaveLength(1)
  })

  it('answers 410 once the session closes, but still shows what was given', async () => {
    const { id, p, view, audio } = await answeredOnce()
    await developer.post(`/api/sessions/${id}/close`).expect(200)

    const res = await put(p.token, 0, { kind: 'rating', values: { brightness: 1 } })
    const after = await state(p.token)

    expect(res.status).toBe(410)
    expect(res.body.error.message).toMatch(/closed/)
    expect(after.status).toBe(200)
    expect(after.body.canAnswer).toBe(false)
    expect(after.body.answers).toEqual([{ trialIndex: 0, answer: answerFor(view.trials[0], KEYS) }])
    expect((await api().get(audio)).status).toBe(410)
    expect((await api().post('/api/player/level').send({ token: p.token })).status).toBe(410)
    const rows = await answerRows(p.id)
    expect(JSON.parse(rows[0].payload).given).toEqual(answerFor(view.trials[0], KEYS))
  })

  it('answers 410 after the deadline day, and not before its end', async () => {
    const { p, view } = await answeredOnce()
    const deadlineEnd = Date.parse(`${isoDay(clock.now(), 2)}T00:00:00Z`) + DAY
    clock.advance(deadlineEnd - 1 - clock.now().getTime())
    const last = await put(p.token, 1, answerFor(view.trials[1], KEYS))
    clock.advance(1)

    const late = await put(p.token, 2, answerFor(view.trials[2], KEYS))

    expect(last.status).toBe(200)
    expect(late.status).toBe(410)
    expect(late.body.error.message).toMatch(/deadline|expired/)
    expect(await answerRows(p.id)).toHaveLength(2)
    // The fixed clock has moved past the staff cookie's life; later tests need a fresh one.
    developer = await signInAs(t.app, 'developer')
  })
})

describe('player audio', () => {
  it('serves byte ranges with nothing identifying in the headers', async () => {
    const { invited } = await study('rating', 1)
    const view = await consented(invited[0])
    const url = view.trials[0].clips[0].audioUrl

    const whole = await api().get(url).buffer(true).parse(binary)
    const part = await api().get(url).set('Range', 'bytes=0-99').buffer(true).parse(binary)

    expect(whole.status).toBe(200)
    expect(part.status).toBe(206)
    expect(part.headers['content-range']).toMatch(/^bytes 0-99\/\d+$/)
    expect(part.headers['content-length']).toBe('100')
    expect(Buffer.compare(part.body, whole.body.subarray(0, 100))).toBe(0)
    expect(whole.body.subarray(0, 4).toString('latin1')).toBe('RIFF')
    for (const res of [whole, part]) {
      expect(res.headers['content-type']).toBe('audio/wav')
      expect(res.headers['cache-control']).toMatch(/private/)
      expect(res.headers['accept-ranges']).toBe('bytes')
      expect(res.headers.etag).toBeUndefined()
      expect(res.headers['last-modified']).toBeUndefined()
      expect(res.headers['content-disposition']).toBeUndefined()
    }
  })

  it('answers 416 for a range past the end', async () => {
    const { invited } = await study('rating', 1)
    const view = await consented(invited[0])
    const res = await api().get(view.trials[0].clips[0].audioUrl).set('Range', 'bytes=99999999-')
    expect(res.status).toBe(416)
    expect(res.headers['content-range']).toMatch(/^bytes \*\/\d+$/)
  })

  it('answers 404 for an address it never gave out', async () => {
    expect((await api().get('/api/player/audio/AAAAAAAAAAAAAAAAAAAAAAAA')).status).toBe(404)
    expect((await api().get('/api/player/audio/..%2F..%2Fetc')).status).toBe(404)
  })
})

describe('byte ranges', () => {
  it.each([
    [undefined, 1000, 'whole'],
    ['bytes=0-99', 1000, { start: 0, end: 99 }],
    ['bytes=900-', 1000, { start: 900, end: 999 }],
    ['bytes=-100', 1000, { start: 900, end: 999 }],
    ['bytes=990-2000', 1000, { start: 990, end: 999 }],
    ['bytes=0-1,5-9', 1000, 'whole'],
    ['bytes=1000-', 1000, null],
    ['bytes=5-2', 1000, null],
  ])('reads %s of %i bytes', (header, size, expected) => {
    expect(byteRange(header, size)).toEqual(expected)
  })
})
