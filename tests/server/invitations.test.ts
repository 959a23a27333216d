import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import jwt from 'jsonwebtoken'
import { fixedClock } from '../../server/clock'
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fakeSmtp'
import { smtpMailer } from '../../server/mail/transport'
import { sendDueReminders } from '../../server/invitations/reminders'
import { buildApp, lastMailTo, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import { addAnswers, addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'

const DAY = 86_400_000

/** The token of the personal link in an invitation or reminder. */
function playerToken(mail: { text: string }): string {
  const match = /\/p\/([A-Za-z0-9._-]+)/.exec(mail.text)
  if (!match) throw new Error('no player link in the mail')
  return match[1]
}

async function emailOf(t: TestApp, playerId: number): Promise<string> {
  return (await t.knex('players').where({ id: playerId }).first('email')).email
}

async function study(t: TestApp, agent: Agent, over: Record<string, unknown> = {}) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 1, 'Invite')
  const clock = t.app.locals.ctx.clock
  return openStudy(agent, {
    name: 'Winding study',
    playerTitle: 'Evening listening',
    format: 'rating',
    recipeIds,
    clipSets,
    playerMessage: 'Use closed headphones.',
    deadline: isoDay(clock.now(), 10),
    ...over,
  })
}

describe('invitations', () => {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  let t: TestApp
  let developer: Agent
  let analyst: Agent
  beforeAll(async () => {
    t = await buildApp({ clock })
    developer = await signInAs(t.app, 'developer')
    analyst = await signInAs(t.app, 'analyst')
  })
  afterAll(() => t.close())

  it('go out only while a session is open', async () => {
    const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1)
    const draft = await developer.post('/api/sessions').send({
      name: 'Not yet',
      playerTitle: 'Listening soon',
      format: 'pair',
      recipeIds,
      clipSets,
      deadline: isoDay(clock.now(), 3),
    })
    const [playerId] = await addPlayers(t.knex, 1)

    const res = await developer
      .post(`/api/sessions/${draft.body.session.id}/invitations`)
      .send({ playerIds: [playerId] })

    expect(res.status).toBe(409)
    expect(res.body.error.message).toMatch(/Open the session/)
  })

  it('are made once per player, with a personal mail carrying the player message, deadline, caution and link', async () => {
    const { id } = await study(t, developer)
    const players = await addPlayers(t.knex, 4)

    const first = await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: players.slice(0, 3) })
    const second = await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: [...players, players[0]] })
    await t.settle()
    const list = await developer.get(`/api/sessions/${id}/invitations`)
    const codesOnly = await analyst.get(`/api/sessions/${id}/invitations`)
    const mail = lastMailTo(t.mailer, await emailOf(t, players[0]))

    expect(first.body).toEqual({ created: 3, existing: 0, mailsQueued: 3 })
    expect(second.body).toEqual({ created: 1, existing: 3, mailsQueued: 1 })
    expect(list.body.invitations).toHaveLength(4)
    expect(list.body.invitations[0]).toMatchObject({
      playerId: players[0],
      status: 'invited',
      answered: 0,
      trialCount: 3,
      remindersSent: 0,
      playerEmail: await emailOf(t, players[0]),
    })
    expect(codesOnly.body.invitations[0]).toMatchObject({ playerName: null, playerEmail: null })
    expect(t.mailer.sent.filter((m) => m.to === mail.to)).toHaveLength(1)
    // The player title, never the staff name (DESIGN.md: only the player words reach players).
    expect(mail.subject).toBe('Invitation: Evening listening')
    expect(`${mail.subject}${mail.text}${mail.html}`).not.toContain('Winding study')
    expect(mail.text).toMatch(/^Hello Testplayer,/)
    expect(mail.text).toContain('Use closed headphones.')
    expect(mail.text).toContain(isoDay(clock.now(), 10))
    expect(mail.text).toMatch(/start with the volume low/)
    expect(mail.html).toMatch(/<a href="http:\/\/localhost:3000\/p\/[\w.-]+"/)
    expect(mail.html).toMatch(/Protect your hearing/)
  })

  it('refuse players who are inactive or have no e-mail, at the field', async () => {
    const { id } = await study(t, developer)
    const [quiet, silent] = await addPlayers(t.knex, 2)
    await t.knex('players').where({ id: quiet }).update({ status: 'inactive' })
    await t.knex('players').where({ id: silent }).update({ email: null })

    const res = await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: [quiet, silent] })

    expect(res.status).toBe(422)
    expect(res.body.error.fields.playerIds.join(' ')).toMatch(/not active.*no e-mail/)
    expect(await t.knex('invitations').where({ session_id: id })).toHaveLength(0)
  })
})

describe('the player link', () => {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  let t: TestApp
  let developer: Agent
  beforeAll(async () => {
    t = await buildApp({ clock })
    developer = await signInAs(t.app, 'developer')
  })
  afterAll(() => t.close())

  async function invited() {
    const { id } = await study(t, developer, { deadline: isoDay(clock.now(), 2) })
    const players = await addPlayers(t.knex, 2)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players })
    await t.settle()
    const tokens = await Promise.all(
      players.map(async (p) => playerToken(lastMailTo(t.mailer, await emailOf(t, p)))),
    )
    const invitations = (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations
    return { id, players, tokens, invitations }
  }

  const land = (token: string) =>
    request(t.app).get('/api/player/invitation').set('X-Invitation-Token', token)

  it('opens the landing page without sign-in, marks it opened once, and shows nothing else', async () => {
    const { id, tokens } = await invited()
    const session = (await developer.get(`/api/sessions/${id}`)).body.session

    const res = await land(tokens[0])
    clock.advance(60_000)
    await land(tokens[0])
    const list = (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations

    expect(res.status).toBe(200)
    expect(res.body).toEqual({
      playerTitle: 'Evening listening',
      format: 'rating',
      playerMessage: 'Use closed headphones.',
      deadline: session.deadline,
      status: 'opened',
      cautions: [expect.stringMatching(/hearing/)],
      trialCount: 3,
      answered: 0,
      firstName: 'Testplayer',
    })
    const text = JSON.stringify(res.body)
    for (const r of session.recipes as { id: number; name: string }[])
      expect(text).not.toContain(r.name)
    expect(text).not.toMatch(/@|clip|recipe/i)
    expect(list[0]).toMatchObject({ status: 'opened', openedAt: '2026-12-01T09:00:00.000Z' })
    expect(list[1].status).toBe('invited')
  })

  it('refuses tampered, foreign, missing and wrong-purpose tokens with invalid_token', async () => {
    const { tokens, invitations } = await invited()
    const [head, body, sig] = tokens[0].split('.')
    const flipped = `${head}.${body}.${sig.slice(0, -2)}${sig.endsWith('AA') ? 'BB' : 'AA'}`
    const claims = jwt.decode(tokens[0]) as { jti: string; exp: number }
    // Signed with our secret but pointing the first player's token id at the second invitation.
    const borrowed = jwt.sign(
      { jti: claims.jti, sub: invitations[1].id, exp: claims.exp },
      t.config.jwtSecret,
      { audience: 'invitation' },
    )
    const staffLink = jwt.sign(
      { jti: claims.jti, sub: invitations[0].id, purpose: 'reset', exp: claims.exp },
      t.config.jwtSecret,
      { audience: 'link' },
    )

    for (const bad of [flipped, borrowed, staffLink, 'not-a-token']) {
      const res = await land(bad)
      expect(res.status, bad).toBe(400)
      expect(res.body.error.code).toBe('invalid_token')
      expect(res.body.error.message).toMatch(/not valid/)
      expect(Object.keys(res.body)).toEqual(['error'])
    }
    const none = await request(t.app).get('/api/player/invitation')
    expect(none.status).toBe(400)
    expect(none.body.error.code).toBe('invalid_token')
  })

  it('refuses a revoked link with 410, and a resend restores the invitation under a new link', async () => {
    const { tokens, invitations, players } = await invited()
    const email = await emailOf(t, players[1])

    const revoked = await developer.post(`/api/invitations/${invitations[1].id}/revoke`)
    const refused = await land(tokens[1])
    // A restore is a resend, which waits ten minutes after the player's last mail.
    clock.advance(11 * 60_000)
    const resent = await developer.post(`/api/invitations/${invitations[1].id}/resend`)
    await t.settle()
    const fresh = playerToken(lastMailTo(t.mailer, email))
    const oldAgain = await land(tokens[1])
    const newOne = await land(fresh)

    expect(revoked.body.invitation).toMatchObject({ status: 'revoked' })
    expect(revoked.body.invitation.revokedAt).not.toBeNull()
    expect(refused.status).toBe(410)
    expect(refused.body.error).toMatchObject({ code: 'invalid_token' })
    expect(refused.body.error.message).toMatch(/withdrawn/)
    expect(resent.body.invitation).toMatchObject({ status: 'invited', revokedAt: null })
    expect(oldAgain.status).toBe(410)
    expect(newOne.status).toBe(200)
  })

  it('refuses links after the deadline and after the session closed, with 410', async () => {
    const first = await invited()
    const second = await invited()
    await developer.post(`/api/sessions/${second.id}/close`)

    const closed = await land(second.tokens[0])
    clock.advance(3 * DAY)
    const expired = await land(first.tokens[0])
    const later = await signInAs(t.app, 'developer')
    const list = (await later.get(`/api/sessions/${first.id}/invitations`)).body.invitations
    const remind = await later.post(`/api/sessions/${first.id}/remind`)
    clock.advance(-3 * DAY)
    developer = await signInAs(t.app, 'developer')

    expect(closed.status).toBe(410)
    expect(closed.body.error.message).toMatch(/closed/)
    expect(expired.status).toBe(410)
    expect(expired.body.error.message).toMatch(/expired/)
    expect(list.map((i: { status: string }) => i.status)).toEqual(['expired', 'expired'])
    expect(remind.status).toBe(409)
  })
})

describe('a deadline moved while the session runs', () => {
  it('keeps links sent earlier working until the new deadline', async () => {
    const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
    const t = await buildApp({ clock })
    const developer = await signInAs(t.app, 'developer')
    const { id } = await study(t, developer, { deadline: isoDay(clock.now(), 1) })
    const [playerId] = await addPlayers(t.knex, 1)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: [playerId] })
    await t.settle()
    const token = playerToken(lastMailTo(t.mailer, await emailOf(t, playerId)))

    await saveEdit(developer, `/api/sessions/${id}`, { deadline: isoDay(clock.now(), 5) })
    clock.advance(3 * DAY)
    const extended = await request(t.app)
      .get('/api/player/invitation')
      .set('X-Invitation-Token', token)
    clock.advance(3 * DAY)
    const over = await request(t.app).get('/api/player/invitation').set('X-Invitation-Token', token)

    expect(extended.status).toBe(200)
    expect(over.status).toBe(410)
    await t.close()
  })
})

describe('reminders', () => {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  let t: TestApp
  let developer: Agent
  beforeAll(async () => {
    t = await buildApp({ clock })
    developer = await signInAs(t.app, 'developer')
  })
  afterAll(() => t.close())

  it('go by hand to one player or to everyone not done and not revoked', async () => {
    const { id } = await study(t, developer)
    const players = await addPlayers(t.knex, 4)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players })
    const invs = (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations
    await t
      .knex('invitations')
      .where({ id: invs[0].id })
      .update({ completed_at: clock.now().toISOString() })
    await addAnswers(t.knex, invs[1].id, [0, 1], clock.now().toISOString())
    await developer.post(`/api/invitations/${invs[3].id}/revoke`)
    // A reminder waits the reminder gap (12 h by default) after the invitation mail.
    const later = 13 * 3600_000
    clock.advance(later)
    const staff = await signInAs(t.app, 'developer')
    const remindedAt = clock.now().toISOString()

    const one = await staff.post(`/api/invitations/${invs[1].id}/remind`)
    const toDone = await staff.post(`/api/invitations/${invs[0].id}/remind`)
    const toRevoked = await staff.post(`/api/invitations/${invs[3].id}/remind`)
    const all = await staff.post(`/api/sessions/${id}/remind`)
    await t.settle()
    clock.advance(-later)
    developer = await signInAs(t.app, 'developer')
    const reminder = lastMailTo(t.mailer, await emailOf(t, players[1]))

    expect(one.body.invitation).toMatchObject({ remindersSent: 1, answered: 2 })
    expect(one.body.invitation.lastRemindedAt).toBe(remindedAt)
    expect(toDone.status).toBe(409)
    expect(toRevoked.status).toBe(409)
    // The player reminded a moment before is left out of "everyone".
    expect(all.body).toEqual({
      reminded: 1,
      skippedRecent: 1,
      heldBack: 0,
      reminderGapHours: 12,
      moreAfter: null,
    })
    expect(reminder.subject).toBe('Reminder: Evening listening')
    expect(reminder.text).toMatch(/answered 2 of 3 trials/)
    expect(`${reminder.text}${reminder.html}`).not.toContain('Winding study')
  })

  it('go out automatically once, the set number of days before the deadline', async () => {
    const { id } = await study(t, developer, {
      deadline: isoDay(clock.now(), 5),
      reminderDaysBefore: 2,
    })
    const players = await addPlayers(t.knex, 3)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players })
    const invs = (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations
    await t
      .knex('invitations')
      .where({ id: invs[2].id })
      .update({ completed_at: clock.now().toISOString() })
    const ctx = t.app.locals.ctx
    await t.settle()
    const before = t.mailer.sent.length

    const early = await sendDueReminders(ctx)
    // The deadline day ends at midnight UTC after it: two days before is 00:00 three days on.
    clock.advance(4 * DAY - 9 * 3600_000 - 1000)
    const stillEarly = await sendDueReminders(ctx)
    clock.advance(2000)
    const due = await sendDueReminders(ctx)
    const repeat = await sendDueReminders(ctx)
    await t.settle()
    clock.advance(-(4 * DAY - 9 * 3600_000 + 1000))
    developer = await signInAs(t.app, 'developer')

    expect([early, stillEarly, due, repeat]).toEqual([0, 0, 2, 0])
    const reminders = t.mailer.sent.slice(before)
    expect(reminders.map((m) => m.subject)).toEqual([
      'Reminder: Evening listening',
      'Reminder: Evening listening',
    ])
    const rows = await t.knex('invitations').where({ session_id: id }).orderBy('player_index')
    expect(rows.map((r) => r.reminders_sent)).toEqual([1, 1, 0])
  })
})

describe('invitation mail while the mail server is down', () => {
  it('waits in the outbox and goes out when the server is back', async () => {
    const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
    const t = await buildApp({ clock })
    const developer = await signInAs(t.app, 'developer')
    const { id } = await study(t, developer)
    const players = await addPlayers(t.knex, 2)
    const emails = await Promise.all(players.map((p) => emailOf(t, p)))
    t.mailer.failing = true

    const res = await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: players })
    await t.settle()
    const waiting = await t.knex('outbox').whereIn('to', emails)
    t.mailer.failing = false
    clock.advance(t.config.mail.retryBaseMs)
    await t.app.locals.ctx.outbox.deliverDue()
    const sent = await t.knex('outbox').whereIn('to', emails)

    expect(res.body).toEqual({ created: 2, existing: 0, mailsQueued: 2 })
    expect(waiting.map((m) => m.status)).toEqual(['pending', 'pending'])
    expect(sent.map((m) => m.status)).toEqual(['sent', 'sent'])
    expect(t.mailer.sent.filter((m) => emails.includes(m.to))).toHaveLength(2)
    await t.close()
  })
})

describe('invitation mail through a real SMTP server', () => {
  let smtp: FakeSmtp
  let t: TestApp
  beforeAll(async () => {
    smtp = await startFakeSmtp()
    t = await buildApp({
      mailer: smtpMailer({ host: '127.0.0.1', port: smtp.port }),
      mailbox: smtp.mailbox,
    })
  })
  afterAll(async () => {
    await t.close()
    await smtp.close()
  })

  it('arrives parsed with text and HTML parts whose link opens the session', async () => {
    const developer = await signInAs(t.app, 'developer')
    const admin = await signInAs(t.app, 'admin')
    const { id } = await study(t, developer)
    const [playerId] = await addPlayers(t.knex, 1)
    const email = await emailOf(t, playerId)

    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: [playerId] })
    await t.settle()
    const mail = (await admin.get('/api/mail/mailbox')).body.mails.find(
      (m: { to: string }) => m.to === email,
    )
    const token = playerToken(mail)
    const landing = await request(t.app)
      .get('/api/player/invitation')
      .set('X-Invitation-Token', token)

    const queued = await t.knex('outbox').where({ to: email }).first('message_id', 'status')

    expect(mail.subject).toBe('Invitation: Evening listening')
    // The Message-ID given at enqueue is the one that arrived.
    expect(mail.messageId).toBe(queued.message_id)
    expect(queued.status).toBe('sent')
    expect(mail.text).toMatch(/Please finish by \d{4}-\d{2}-\d{2}/)
    expect(mail.text).toMatch(/Protect your hearing/)
    expect(mail.html).toContain(`href="http://localhost:3000/p/${token}"`)
    expect(landing.status).toBe(200)
    expect(landing.body.playerTitle).toBe('Evening listening')
  })
})
