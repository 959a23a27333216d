import { afterEach, describe, expect, it } from 'vitest'
import { fixedClock } from '../../server/clock'
import { sendDueReminders } from '../../server/invitations/reminders'
import type { Config } from '../../server/config'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from './sessionFixtures'

// Invitation mail goes only as often as the throttles allow: a reminder no sooner than the
// reminder gap (REMINDER_GAP_HOURS, 12 h by default) after the player's last mail, a resend no
// sooner than ten minutes after it, and at most SESSION_MAILS_PER_HOUR invitations and reminders
// from one session in any hour. A refusal is HTTP 429 Too Many Requests, the status RFC 6585 §4
// defines for "too many requests in a given amount of time". The times in the expected messages
// are worked by hand from those rules and the fake clock.

const MINUTE = 60_000
const HOUR = 60 * MINUTE
const DAY = 24 * HOUR

let t: TestApp | undefined
afterEach(async () => {
  await t?.close()
  t = undefined
})

async function setup(mailLimits: Partial<Config['mailLimits']> = {}) {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  t = await buildApp({
    clock,
    config: {
      // The clock moves by hours here; the sign-in should outlast it.
      sessionMinutes: 30 * 24 * 60,
      mailLimits: {
        reminderGapMs: 12 * HOUR,
        sessionMailsPerHour: 400,
        resetsPerHour: 3,
        ...mailLimits,
      },
    },
  })
  const app = t
  const developer = await signInAs(app.app, 'developer')
  const { recipeIds, clipSets } = await studyFixture(app.knex, 2, 1, 'Throttle')
  const { id } = await openStudy(developer, {
    name: 'Throttle study',
    playerTitle: 'Evening listening',
    format: 'pair',
    recipeIds,
    clipSets,
    deadline: isoDay(clock.now(), 10),
  })
  const invite = (playerIds: number[]) =>
    developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  const list = async (): Promise<Record<string, unknown>[]> =>
    (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations
  /** Invitation and reminder mails queued for this session's players. */
  const queued = async () => {
    const emails = (
      await app
        .knex('invitations as i')
        .join('players as p', 'p.id', 'i.player_id')
        .where('i.session_id', id)
        .select('p.email')
    ).map((r: { email: string }) => r.email)
    return app
      .knex('outbox')
      .whereIn('to', emails)
      .whereIn('kind', ['session_invitation', 'session_reminder'])
  }
  return { t: app, clock, developer: developer as Agent, id, invite, list, queued }
}

describe('reminders to one player', () => {
  it('wait the reminder gap after the invitation and after each reminder, and say until when', async () => {
    const { t, clock, developer, invite, list, queued } = await setup()
    const [player] = await addPlayers(t.knex, 1)
    await invite([player])
    const [inv] = await list()
    const remind = () => developer.post(`/api/invitations/${inv.id}/remind`)

    const atOnce = await remind()
    clock.advance(12 * HOUR - MINUTE)
    const almost = await remind()
    clock.advance(MINUTE)
    const due = await remind()
    clock.advance(2 * HOUR)
    const again = await remind()
    const [row] = await list()

    expect(atOnce.status).toBe(429)
    expect(atOnce.body.error).toEqual({
      code: 'rate_limited',
      message:
        'The invitation went to this player less than a minute ago; the next reminder can go after 21:00 UTC.',
    })
    expect(almost.status).toBe(429)
    expect(almost.body.error.message).toBe(
      'The invitation went to this player 11 hours ago; the next reminder can go after 21:00 UTC.',
    )
    expect(due.status).toBe(200)
    expect(due.body.invitation.nextReminderAt).toBe('2026-12-02T09:00:00.000Z')
    expect(again.status).toBe(429)
    expect(again.body.error.message).toBe(
      'A reminder went to this player 2 hours ago; the next reminder can go after 2026-12-02 09:00 UTC.',
    )
    expect(row).toMatchObject({
      remindersSent: 1,
      lastRemindedAt: '2026-12-01T21:00:00.000Z',
      nextReminderAt: '2026-12-02T09:00:00.000Z',
      nextResendAt: null,
    })
    expect((await queued()).map((m) => m.kind)).toEqual(['session_invitation', 'session_reminder'])
  })

  it('let only one of several calls at the same moment through', async () => {
    const { t, clock, developer, invite, list, queued } = await setup()
    const [player] = await addPlayers(t.knex, 1)
    await invite([player])
    const [inv] = await list()
    clock.advance(13 * HOUR)

    const answers = await Promise.all(
      Array.from({ length: 10 }, () => developer.post(`/api/invitations/${inv.id}/remind`)),
    )

    expect(answers.map((r) => r.status).sort()).toEqual([200, ...Array(9).fill(429)])
    expect((await queued()).filter((m) => m.kind === 'session_reminder')).toHaveLength(1)
  })

  it('from the periodic job wait the same gap after a reminder sent by hand', async () => {
    const { t, clock, developer, list, queued, id } = await setup()
    await t.knex('sessions').where({ id }).update({ reminder_days_before: 2 })
    const [player] = await addPlayers(t.knex, 1)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: [player] })
    const [inv] = await list()
    // The deadline 2026-12-11 ends at 2026-12-12 00:00 UTC; two days before is 2026-12-10 00:00.
    clock.advance(8 * DAY + 14 * HOUR) // 2026-12-09 23:00
    await developer.post(`/api/invitations/${inv.id}/remind`)
    clock.advance(2 * HOUR) // 01:00, due, but the hand reminder went two hours ago

    const held = await sendDueReminders(t.app.locals.ctx)
    clock.advance(10 * HOUR) // 11:00, twelve hours after the hand reminder
    const sent = await sendDueReminders(t.app.locals.ctx)
    const repeat = await sendDueReminders(t.app.locals.ctx)

    expect([held, sent, repeat]).toEqual([0, 1, 0])
    expect((await queued()).filter((m) => m.kind === 'session_reminder')).toHaveLength(2)
  })
})

describe('reminding everyone', () => {
  it('skips players mailed within the gap, so calls in a row queue mail only the first time', async () => {
    const { t, clock, developer, id, invite, queued } = await setup()
    await invite(await addPlayers(t.knex, 7))
    clock.advance(13 * HOUR)

    const first = await developer.post(`/api/sessions/${id}/remind`)
    const second = await developer.post(`/api/sessions/${id}/remind`)
    const third = await developer.post(`/api/sessions/${id}/remind`)

    expect(first.body).toEqual({
      reminded: 7,
      skippedRecent: 0,
      heldBack: 0,
      reminderGapHours: 12,
      moreAfter: null,
    })
    expect([second.body, third.body]).toEqual([
      expect.objectContaining({ reminded: 0, skippedRecent: 7 }),
      expect.objectContaining({ reminded: 0, skippedRecent: 7 }),
    ])
    expect((await queued()).filter((m) => m.kind === 'session_reminder')).toHaveLength(7)
  })

  it('sends once when called several times at the same moment', async () => {
    const { t, clock, developer, id, invite, queued } = await setup()
    await invite(await addPlayers(t.knex, 7))
    clock.advance(13 * HOUR)

    const answers = await Promise.all(
      Array.from({ length: 3 }, () => developer.post(`/api/sessions/${id}/remind`)),
    )

    expect(answers.map((r) => r.body.reminded).sort()).toEqual([0, 0, 7])
    expect((await queued()).filter((m) => m.kind === 'session_reminder')).toHaveLength(7)
  })

  it('reminds up to the hourly cap, holds the rest back, and refuses when no room is left', async () => {
    const { t, clock, developer, id, invite, queued } = await setup({ sessionMailsPerHour: 5 })
    const players = await addPlayers(t.knex, 7)
    await invite(players.slice(0, 5))
    clock.advance(HOUR)
    await invite(players.slice(5))
    clock.advance(12 * HOUR + 30 * MINUTE) // 2026-12-01 22:30

    const partly = await developer.post(`/api/sessions/${id}/remind`)
    const full = await developer.post(`/api/sessions/${id}/remind`)
    clock.advance(HOUR)
    const rest = await developer.post(`/api/sessions/${id}/remind`)

    expect(partly.body).toEqual({
      reminded: 5,
      skippedRecent: 0,
      heldBack: 2,
      reminderGapHours: 12,
      moreAfter: '2026-12-01T23:30:00.000Z',
    })
    expect(full.status).toBe(429)
    expect(full.body.error.message).toBe(
      'This session may queue at most 5 invitation and reminder mails in any hour; 5 went in the last hour. Nothing was sent: the next 2 reminders can go after 23:30 UTC.',
    )
    expect(rest.body).toMatchObject({ reminded: 2, skippedRecent: 5, heldBack: 0 })
    expect((await queued()).filter((m) => m.kind === 'session_reminder')).toHaveLength(7)
  })
})

describe('sending an invitation again', () => {
  it('waits ten minutes after the last mail, so a corrected address still gets it soon', async () => {
    const { t, clock, developer, invite, list, queued } = await setup()
    const [player] = await addPlayers(t.knex, 1)
    await invite([player])
    const [inv] = await list()
    const resend = () => developer.post(`/api/invitations/${inv.id}/resend`)

    const atOnce = await resend()
    const listed = (await list())[0]
    clock.advance(10 * MINUTE)
    const later = await resend()
    const twice = await resend()

    expect(atOnce.status).toBe(429)
    expect(atOnce.body.error).toEqual({
      code: 'rate_limited',
      message:
        'The invitation went to this player less than a minute ago; the invitation can be sent again after 09:10 UTC.',
    })
    expect(listed.nextResendAt).toBe('2026-12-01T09:10:00.000Z')
    expect(later.status).toBe(200)
    expect(later.body.invitation).toMatchObject({
      lastSentAt: '2026-12-01T09:10:00.000Z',
      nextResendAt: '2026-12-01T09:20:00.000Z',
      nextReminderAt: '2026-12-01T21:10:00.000Z',
    })
    expect(twice.status).toBe(429)
    expect(await queued()).toHaveLength(2)
  })

  it('after a revoke waits the same ten minutes', async () => {
    const { t, developer, invite, list, queued } = await setup()
    const [player] = await addPlayers(t.knex, 1)
    await invite([player])
    const [inv] = await list()

    await developer.post(`/api/invitations/${inv.id}/revoke`)
    const restore = await developer.post(`/api/invitations/${inv.id}/resend`)

    expect(restore.status).toBe(429)
    expect((await list())[0].status).toBe('revoked')
    expect(await queued()).toHaveLength(1)
  })
})

describe('the hourly cap of one session', () => {
  it('refuses an invitation call that would pass it, whole, and names the limit and the time', async () => {
    const { t, clock, invite, list, queued } = await setup({ sessionMailsPerHour: 5 })
    const players = await addPlayers(t.knex, 9)

    const tooMany = await invite(players.slice(0, 6))
    const nothing = { invitations: (await list()).length, mails: (await queued()).length }
    await invite(players.slice(0, 3))
    clock.advance(20 * MINUTE)
    await invite(players.slice(3, 4))
    const two = await invite(players.slice(4, 6))
    const five = await invite(players.slice(4, 9))
    const one = await invite(players.slice(4, 5))
    const invited = (await list()).length
    clock.advance(40 * MINUTE) // 10:00: the three from 09:00 leave the hour
    const afterHour = await invite(players.slice(4, 7))

    expect(tooMany.status).toBe(429)
    expect(tooMany.body.error).toEqual({
      code: 'rate_limited',
      message:
        'This session may queue at most 5 invitation and reminder mails in any hour, and 6 is more than one hour allows. Nothing was sent: send them in groups of at most 5, an hour apart.',
    })
    expect(nothing).toEqual({ invitations: 0, mails: 0 })
    expect(two.status).toBe(429)
    expect(two.body.error.message).toBe(
      'This session may queue at most 5 invitation and reminder mails in any hour; 4 went in the last hour, so 1 more can go now. Nothing was sent: all 2 can go after 10:00 UTC.',
    )
    // Four of the five must leave the hour: the fourth oldest went at 09:20.
    expect(five.body.error.message).toMatch(/all 5 can go after 10:20 UTC\.$/)
    expect(one.body).toEqual({ created: 1, existing: 0, mailsQueued: 1 })
    expect(invited).toBe(5)
    expect(afterHour.body).toEqual({ created: 2, existing: 1, mailsQueued: 2 })
    expect(await queued()).toHaveLength(7)
  })

  it('counts reminders and resends with invitations', async () => {
    const { t, clock, developer, invite, list } = await setup({ sessionMailsPerHour: 3 })
    await invite(await addPlayers(t.knex, 2))
    clock.advance(13 * HOUR)
    const [a, b] = await list()

    const reminded = await developer.post(`/api/invitations/${a.id}/remind`)
    const resent = await developer.post(`/api/invitations/${b.id}/resend`)
    const third = await invite(await addPlayers(t.knex, 1))
    const fourth = await developer.post(`/api/invitations/${a.id}/resend`)
    clock.advance(10 * MINUTE)
    const stillFull = await developer.post(`/api/invitations/${a.id}/resend`)

    expect([reminded.status, resent.status, third.status]).toEqual([200, 200, 200])
    expect(fourth.status).toBe(429)
    expect(stillFull.status).toBe(429)
    expect(stillFull.body.error.message).toMatch(/at most 3 invitation and reminder mails/)
  })

  it('holds against 500 invitations sent at once at a cap of 400', async () => {
    const { t, invite, list, queued } = await setup({ sessionMailsPerHour: 400 })
    const players = await addPlayers(t.knex, 500)

    const res = await invite(players)

    expect(res.status).toBe(429)
    expect(res.body.error.message).toMatch(/at most 400 invitation and reminder mails in any hour/)
    expect(await list()).toHaveLength(0)
    expect(await queued()).toHaveLength(0)
  })
})
