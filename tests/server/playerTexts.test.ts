import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { fixedClock } from '../../server/clock'
import { createKnex } from '../../server/db/knex'
import * as playerWordsMigration from '../../migrations/20261202000200_player_words'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, addRecipe, isoDay, openStudy, studyFixture } from './sessionFixtures'
import { giveAudio, invitedOf } from './playerFixtures'

// Players see the player title and message, never the staff name or purpose (DESIGN.md, "Player
// title and player message"); what travels with the strings carries codes, not recipes.

const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-player-texts-'))
const TITLE = 'Evening listening, autumn round'
const MESSAGE = 'Use closed headphones and take a break halfway.'
const PURPOSE = 'Staff note: does the stiffer compound cost warmth?'
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

async function recipeNames(ids: number[]): Promise<string[]> {
  return (await t.knex('recipes').whereIn('id', ids).select('name')).map(
    (r: { name: string }) => r.name,
  )
}

/** Everything staff wrote for themselves: none of it may reach a player. */
const staffWords = (name: string, names: string[]) => [name, PURPOSE, ...names]

function expectNone(what: string, text: string, secrets: string[]) {
  for (const s of secrets) expect(text, `${what} shows "${s}"`).not.toContain(s)
}

describe('the words that reach players', () => {
  it('are the player title and message in mails, landing, state, plan and preview', async () => {
    const { recipeIds, clipSets } = await studyFixture(t.knex, 3, 1, 'Garnet')
    await giveAudio(
      t.knex,
      mediaDir,
      clipSets.flatMap((s) => s.clipIds),
    )
    const names = await recipeNames(recipeIds)
    const name = names.join(' vs ')
    const { id } = await openStudy(developer, {
      name,
      purpose: PURPOSE,
      playerTitle: TITLE,
      playerMessage: MESSAGE,
      format: 'rating',
      recipeIds,
      clipSets,
      deadline: isoDay(clock.now(), 10),
    })
    const [playerId] = await addPlayers(t.knex, 1)
    await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds: [playerId] })
    // A reminder waits the reminder gap (12 h by default) after the invitation mail.
    clock.advance(13 * 3600_000)
    developer = await signInAs(t.app, 'developer')
    await developer.post(`/api/sessions/${id}/remind`)
    await t.settle()
    const email = (await t.knex('players').where({ id: playerId }).first('email')).email
    const mails = t.mailer.sent.filter((m) => m.to === email)
    const [{ token }] = await invitedOf(t, id)
    const api = () => request(t.app)
    const landing = await api().get('/api/player/invitation').set('X-Invitation-Token', token)
    await api().post('/api/player/consent').send({ token })
    const state = await api().get('/api/player/state').set('X-Invitation-Token', token)
    const plan = await api().get('/api/player/plan').set('X-Invitation-Token', token)
    const preview = await developer.get(`/api/sessions/${id}/preview`)
    const staff = await developer.get(`/api/sessions/${id}`)

    expect(mails.map((m) => m.subject)).toEqual([`Invitation: ${TITLE}`, `Reminder: ${TITLE}`])
    for (const m of mails) {
      expect(m.text).toContain(TITLE)
      expect(m.text).toContain(MESSAGE)
      expect(m.html).toContain(MESSAGE)
      expectNone(m.subject, `${m.subject}\n${m.text}\n${m.html}`, staffWords(name, names))
    }
    expect(landing.body).toMatchObject({ playerTitle: TITLE, playerMessage: MESSAGE })
    expect(state.body.landing).toMatchObject({ playerTitle: TITLE, playerMessage: MESSAGE })
    expect(plan.body.plan).toMatchObject({ playerTitle: TITLE, playerMessage: MESSAGE })
    expect(preview.body.plan).toMatchObject({ playerTitle: TITLE, playerMessage: MESSAGE })
    for (const [what, res] of Object.entries({ landing, state, plan, preview }))
      expectNone(what, JSON.stringify(res.body), staffWords(name, names))
    // Staff screens keep the staff name and purpose beside the player words.
    expect(staff.body.session).toMatchObject({
      name,
      purpose: PURPOSE,
      playerTitle: TITLE,
      playerMessage: MESSAGE,
    })
  })

  it('carry over to a later time point of an aging study', async () => {
    const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Garnet later')
    const { id } = await openStudy(developer, {
      name: 'Garnet over time',
      playerTitle: TITLE,
      playerMessage: MESSAGE,
      format: 'pair',
      recipeIds,
      clipSets,
      deadline: isoDay(clock.now(), 10),
      timePointLabel: 'day 0',
    })

    const res = await developer
      .post(`/api/sessions/${id}/time-points`)
      .send({ label: 'week 2', deadline: isoDay(clock.now(), 24) })

    expect(res.status).toBe(201)
    expect(res.body.session).toMatchObject({ playerTitle: TITLE, playerMessage: MESSAGE })
  })
})

describe('what travels with the strings', () => {
  async function playtest() {
    const recipeIds = [
      await addRecipe(t.knex, 'Harl A bare'),
      await addRecipe(t.knex, 'Harl A compound'),
    ]
    const names = await recipeNames(recipeIds)
    const name = `${names[0]} against ${names[1]}`
    const { id } = await openStudy(developer, {
      name,
      purpose: PURPOSE,
      playerTitle: 'Strings to try at home',
      playerMessage: 'Play each set for two days before rating it.',
      format: 'playtest',
      recipeIds,
      deadline: isoDay(clock.now(), 21),
    })
    await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: await addPlayers(t.knex, 2) })
    return { id, name, names }
  }

  it('is a label sheet of codes, QR codes, the player title and the caution only', async () => {
    const { id, name, names } = await playtest()

    const res = await developer.get(`/api/sessions/${id}/labels`)

    expect(res.status).toBe(200)
    expect(Object.keys(res.body).sort()).toEqual(['caution', 'playerTitle', 'players'])
    expect(res.body.playerTitle).toBe('Strings to try at home')
    expect(res.body.caution).toMatch(/eye protection/)
    for (const p of res.body.players) {
      expect(Object.keys(p).sort()).toEqual(['playerCode', 'sets'])
      for (const s of p.sets)
        expect(Object.keys(s).sort()).toEqual(['code', 'position', 'qrSvg', 'url'])
    }
    const text = JSON.stringify(res.body)
    expectNone('labels', text, staffWords(name, names))
    expect(text).not.toMatch(/recipe|packing|Testplayer/i)
  })

  it('keeps the key to the envelopes on a staff packing list of its own', async () => {
    const { id, name, names } = await playtest()
    const analyst = await signInAs(t.app, 'analyst')

    const res = await developer.get(`/api/sessions/${id}/packing-list`)
    const labels = (await developer.get(`/api/sessions/${id}/labels`)).body
    const refused = await analyst.get(`/api/sessions/${id}/packing-list`)

    expect(res.status).toBe(200)
    expect(res.body.sessionName).toBe(name)
    expect(res.body.players).toHaveLength(2)
    for (const [i, p] of res.body.players.entries()) {
      expect(p.playerCode).toBe(labels.players[i].playerCode)
      expect(p.playerName).toMatch(/^Testplayer/)
      expect(p.lines.map((l: { code: number }) => l.code)).toEqual(
        labels.players[i].sets.map((s: { code: number }) => s.code),
      )
      for (const l of p.lines) expect(names).toContain(l.recipeName)
    }
    expect(refused.status).toBe(403)
  })
})

describe('the player-words migration', () => {
  it('keeps the old instructions as the player message and gives neutral titles by format', async () => {
    const knex = createKnex(':memory:')
    try {
      const before = async () => {
        const v = await knex.migrate.currentVersion()
        return v === 'none' || v < '20261202000100'
      }
      while (await before()) await knex.migrate.up()
      const now = new Date().toISOString()
      const session = (format: string, name: string, instructions: string) => ({
        name,
        format,
        seed: 'abc',
        instructions,
        deadline: '2026-12-20',
        created_at: now,
        updated_at: now,
      })
      await knex('sessions').insert([
        session('pair', 'Aurel A bare vs Aurel A heavy compound', 'Choose the one you prefer.'),
        session('playtest', 'Aurel A on your own violin', ''),
      ])

      const [playerId] = await knex('players').insert({
        code: 'P-MIG1',
        instruments: '["violin"]',
        level: 'professional',
        status: 'active',
        created_at: now,
        updated_at: now,
      })
      const first: { id: number } = await knex('sessions').orderBy('id').first('id')
      await knex('invitations').insert({
        session_id: first.id,
        player_id: playerId,
        player_index: 0,
        invited_at: now,
        last_sent_at: now,
      })

      await knex.migrate.up()
      const after = await knex('sessions').orderBy('id')
      await knex('sessions').where({ id: after[1].id }).update({ player_title: 'At home' })
      // Safe to run again: titles people wrote stay.
      await playerWordsMigration.up(knex)
      const again = await knex('sessions').orderBy('id')
      await knex.migrate.down()
      const down = await knex('sessions').orderBy('id')

      expect(after.map((s) => [s.player_title, s.player_message])).toEqual([
        ['Listening session', 'Choose the one you prefer.'],
        ['Play-test session', ''],
      ])
      expect(after[0]).not.toHaveProperty('instructions')
      expect(again.map((s) => s.player_title)).toEqual(['Listening session', 'At home'])
      expect(down.map((s) => s.instructions)).toEqual(['Choose the one you prefer.', ''])
      expect(down[0]).not.toHaveProperty('player_title')
      // Changing the sessions table never takes the invitations with it.
      expect(await knex('invitations').where({ session_id: first.id })).toHaveLength(1)
    } finally {
      await knex.destroy()
    }
  })
})
