import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mediaFolders } from '../../../server/clips/storage'
import { buildApp, memoryMailbox, signInAs, type Agent, type TestApp } from '../helpers'
import { addPlayers, isoDay, openStudy, studyFixture } from '../sessionFixtures'
import { giveAudio } from '../playerFixtures'

// What a page on another site can make a signed-in browser send without script access: an HTML
// form posts text/plain, application/x-www-form-urlencoded or multipart/form-data (HTML Living
// Standard, form submission), and the browser names the page's origin in `Origin` (Fetch
// standard) and says `Sec-Fetch-Site: cross-site` (Fetch Metadata Request Headers).

const EVIL = 'http://evil.example.test'

let t: TestApp
let mediaDir: string
let developer: Agent
let admin: Agent
let sessionId: number
let invitationId: number

beforeAll(async () => {
  mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-csrf-'))
  mediaFolders(mediaDir)
  t = await buildApp({ config: { mediaDir }, mailbox: memoryMailbox() })
  developer = await signInAs(t.app, 'developer')
  admin = await signInAs(t.app, 'admin')
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Csrf')
  await giveAudio(
    t.knex,
    mediaDir,
    clipSets.flatMap((s) => s.clipIds),
  )
  sessionId = (
    await openStudy(developer, {
      name: 'Forged posts',
      format: 'pair',
      recipeIds,
      clipSets,
      deadline: isoDay(t.app.locals.ctx.clock.now(), 14),
    })
  ).id
  await developer
    .post(`/api/sessions/${sessionId}/invitations`)
    .send({ playerIds: await addPlayers(t.knex, 2) })
  await t.settle()
  invitationId = (await t.knex('invitations').where({ session_id: sessionId }).first('id')).id
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

const mails = async () => Number((await t.knex('outbox').count({ n: '*' }).first())?.n ?? 0)

describe('a form posted from another site', () => {
  it.each([
    ['text/plain', 'x=1'],
    ['application/x-www-form-urlencoded', 'x=1'],
  ])('as %s cannot close, remind or revoke', async (type, body) => {
    const before = await mails()
    for (const path of [
      `/api/sessions/${sessionId}/close`,
      `/api/sessions/${sessionId}/remind`,
      `/api/invitations/${invitationId}/revoke`,
    ]) {
      const res = await developer
        .post(path)
        .set('Origin', EVIL)
        .set('Content-Type', type)
        .send(body)
      expect(res.status, path).toBe(403)
      expect(res.body.error.code, path).toBe('forbidden')
    }
    expect((await t.knex('sessions').where({ id: sessionId }).first('status')).status).toBe('open')
    expect(
      (await t.knex('invitations').where({ id: invitationId }).first('revoked_at')).revoked_at,
    ).toBeNull()
    expect(await mails()).toBe(before)
  })

  it('as multipart cannot import players into the panel', async () => {
    const before = await t.knex('players').count({ n: '*' }).first()
    const res = await admin
      .post('/api/panel/import')
      .set('Origin', EVIL)
      .attach('file', Buffer.from('name,email\nForged Player,forged@example.test\n'), 'p.csv')
    expect(res.status).toBe(403)
    expect(await t.knex('players').count({ n: '*' }).first()).toEqual(before)
  })

  it('is refused by its Fetch Metadata when no Origin is sent', async () => {
    const res = await developer
      .post(`/api/sessions/${sessionId}/close`)
      .set('Sec-Fetch-Site', 'cross-site')
    expect(res.status).toBe(403)
    const sibling = await developer
      .post(`/api/invitations/${invitationId}/revoke`)
      .set('Sec-Fetch-Site', 'same-site')
    expect(sibling.status).toBe(403)
  })
})

describe('content types', () => {
  it('a JSON route refuses text/plain and form bodies with 415, even from no browser', async () => {
    for (const type of [
      'text/plain',
      'application/x-www-form-urlencoded',
      'multipart/form-data; boundary=x',
    ]) {
      const res = await developer
        .post(`/api/sessions/${sessionId}/remind`)
        .set('Content-Type', type)
        .send('--x--')
      expect(res.status, type).toBe(415)
      expect(res.body.error.code, type).toBe('unsupported_media_type')
    }
    const login = await developer
      .post('/api/auth/login')
      .set('Content-Type', 'application/x-www-form-urlencoded')
      .send('email=a%40b.test&password=x')
    expect(login.status).toBe(415)
  })

  it('an upload route refuses JSON with 415', async () => {
    const res = await admin.post('/api/panel/import').send({ file: 'x' })
    expect(res.status).toBe(415)
  })
})

describe('the product’s own pages', () => {
  it('write with their own origin, the configured public one, or a request with no browser headers', async () => {
    const own = await developer
      .post(`/api/invitations/${invitationId}/remind`)
      .set('Origin', t.config.publicUrl)
      .set('Sec-Fetch-Site', 'same-origin')
    expect([401, 403, 415]).not.toContain(own.status)
    const tool = await developer.post(`/api/sessions/${sessionId}/close`)
    expect(tool.status).toBe(200)
  })
})

describe('personal data in answers', () => {
  it('is never stored by a browser or proxy (Cache-Control: no-store, RFC 9111 §5.2.2.5)', async () => {
    for (const [agent, path] of [
      [admin, '/api/staff'],
      [admin, '/api/panel/players'],
      [admin, '/api/mail/mailbox'],
      [admin, '/api/audit'],
      [developer, `/api/sessions/${sessionId}/invitations`],
      [developer, `/api/sessions/${sessionId}/packing-list`],
      [developer, '/api/auth/me'],
    ] as const) {
      const res = await agent.get(path)
      expect(res.headers['cache-control'], path).toBe('no-store')
    }
  })
})
