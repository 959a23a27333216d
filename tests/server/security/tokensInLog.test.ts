import { Writable } from 'node:stream'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import pino from 'pino'
import { DEMO, DEMO_PASSWORD, buildApp, memoryMailbox, type TestApp } from '../helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from '../sessionFixtures'
import { giveAudio, invitedOf } from '../playerFixtures'
import { walk } from '../blinding/walk'
import { mediaFolders } from '../../../server/clips/storage'
import { systemClock } from '../../../server/clock'
import { seedDemoClips } from '../../../seeds/demo/clips'
import { seedDemoSessions } from '../../../seeds/demo/sessions'

// Whoever reads the server's log must not be able to act as anyone: no invitation link, no
// set-password or reset link, no session cookie may appear in it (OWASP ASVS 4.0.3 §7.1.1, "the
// application does not log credentials or payment details. Session tokens should only be stored
// in logs in an irreversible, hashed form": from memory). The log is read back after a full walk:
// staff sign in, a new colleague is invited and sets a password, a reset is asked for and used,
// and every player of an open session goes the whole way through, also the old way with the
// token in the query string.

const lines: string[] = []
const sink = new Writable({
  write(chunk, _enc, done) {
    lines.push(String(chunk))
    done()
  },
})

let t: TestApp
let mediaDir: string
const issued = new Set<string>()

const cookieOf = (res: request.Response) =>
  ([] as string[])
    .concat(res.headers['set-cookie'] ?? [])
    .map((c) => /^rd_session=([^;]+)/.exec(c)?.[1])
    .filter((v): v is string => Boolean(v))

/** The token of the newest set-password or reset mail to an address, query or fragment alike. */
function linkTokenTo(email: string): string {
  const mail = [...t.mailer.sent].reverse().find((m) => m.to === email)
  const token = mail && /set-password[?#]token=([\w.%-]+)/.exec(mail.text)?.[1]
  if (!token) throw new Error(`no link mail to ${email}`)
  return decodeURIComponent(token)
}

beforeAll(async () => {
  mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-log-'))
  t = await buildApp({
    config: { mediaDir },
    mailbox: memoryMailbox(),
    logger: pino({ level: 'info' }, sink),
  })
  // The demo's story: its sessions, invitations and answers, made through the services.
  await seedDemoClips({ knex: t.knex, folders: mediaFolders(mediaDir), clock: systemClock })
  await seedDemoSessions(t.app.locals.ctx)
  await t.settle()
}, 180_000)
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

describe('the server log after a full walk', () => {
  it('holds a line per API request and none of the tokens issued', async () => {
    const admin = request.agent(t.app)
    const signedIn = await admin
      .post('/api/auth/login')
      .send({ email: DEMO.admin, password: DEMO_PASSWORD })
    expect(signedIn.status).toBe(200)
    cookieOf(signedIn).forEach((c) => issued.add(c))

    // A new colleague: invitation mail, the page checks the link, a password is set.
    const email = 'new.colleague@example.test'
    const made = await admin
      .post('/api/staff')
      .send({ email, name: 'New Colleague', role: 'developer' })
    expect(made.status).toBe(201)
    await t.settle()
    const invite = linkTokenTo(email)
    issued.add(invite)
    await request(t.app).post('/api/auth/link').send({ token: invite })
    await request(t.app).get('/api/auth/link').query({ token: invite })
    const set = await request(t.app)
      .post('/api/auth/set-password')
      .send({ token: invite, password: 'Amber rosin on a winter bridge 7' })
    expect(set.status).toBe(200)
    cookieOf(set).forEach((c) => issued.add(c))

    // A reset asked for and used.
    await request(t.app).post('/api/auth/forgot').send({ email })
    await t.settle()
    const reset = linkTokenTo(email)
    issued.add(reset)
    await request(t.app).get(`/api/auth/link?token=${encodeURIComponent(reset)}`)
    const used = await request(t.app)
      .post('/api/auth/set-password')
      .send({ token: reset, password: 'Ebony pegs turn slowly in spring 9' })
    expect(used.status).toBe(200)
    cookieOf(used).forEach((c) => issued.add(c))

    // An open session and every player's whole way through it.
    const developer = request.agent(t.app)
    const dev = await developer
      .post('/api/auth/login')
      .send({ email: DEMO.developer, password: DEMO_PASSWORD })
    cookieOf(dev).forEach((c) => issued.add(c))
    const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 1)
    await giveAudio(
      t.knex,
      mediaDir,
      clipSets.flatMap((s) => s.clipIds),
    )
    const { id } = await openStudy(developer, {
      name: 'Log walk',
      format: 'rating',
      recipeIds,
      clipSets,
      deadline: isoDay(t.app.locals.ctx.clock.now(), 7),
    })
    const playerIds = await addPlayers(t.knex, 2)
    expect(
      (await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })).status,
    ).toBe(200)
    await t.settle()
    const invited = await invitedOf(t, id)
    for (const inv of invited) {
      issued.add(inv.token)
      await walk(t.app, t.app.locals.tables, inv.token, () => ({ attempt: 1, responses: [] }))
      // What an old page or a hand-typed address would send.
      await request(t.app).get('/api/player/state').query({ token: inv.token })
      await request(t.app).get(`/api/player/invitation?x=1&token=${inv.token}`)
    }
    // Every invitation of the demo, walked the same way.
    const demo: { id: number }[] = await t.knex('sessions').whereNot({ id }).select('id')
    for (const s of demo)
      for (const inv of await invitedOf(t, s.id)) {
        issued.add(inv.token)
        await walk(t.app, t.app.locals.tables, inv.token, () => ({ attempt: 1, responses: [] }))
      }
    const mailed = t.mailer.sent.flatMap((m) =>
      [...m.text.matchAll(/\/p\/([\w.-]+)/g)].map((x) => x[1]),
    )
    expect(mailed.length).toBeGreaterThan(0)
    mailed.forEach((token) => issued.add(token))

    const log = lines.join('')
    expect(lines.length).toBeGreaterThan(40)
    expect(log).toContain('/api/player/state')
    expect(log).toContain('/api/auth/set-password')
    expect(issued.size).toBeGreaterThanOrEqual(8)
    for (const token of issued)
      expect(log.includes(token), `a token in the log: ${token.slice(0, 12)}…`).toBe(false)
    // Nothing shaped like a JWT at all (RFC 7519 §3: three base64url parts).
    expect(log).not.toMatch(/eyJ[\w-]*\.[\w-]+\.[\w-]*/)
    expect(log).toContain('token=[redacted]')
  }, 120_000)

  it('takes a player token from its header only, never from the query string', async () => {
    const [inv] = await invitedOf(
      t,
      (await t.knex('sessions').where({ name: 'Log walk' }).first('id')).id,
    )
    for (const path of ['/api/player/invitation', '/api/player/state', '/api/player/plan']) {
      const inQuery = await request(t.app).get(path).query({ token: inv.token })
      expect(inQuery.status, path).toBe(400)
      expect(inQuery.body.error.code, path).toBe('invalid_token')
      const inHeader = await request(t.app).get(path).set('X-Invitation-Token', inv.token)
      expect(inHeader.status, path).toBe(200)
    }
  })
})
