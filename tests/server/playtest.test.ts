import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import jsQR from 'jsqr'
import { fixedClock } from '../../server/clock'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addPlayers, addRecipe, isoDay, openStudy, studyFixture } from './sessionFixtures'

/**
 * Draws the SVG that the qrcode package writes (one stroked path of unit-high runs) into RGBA
 * pixels, so an independent decoder can read it back as a phone would.
 */
function rasterise(svg: string, scale = 4): { data: Uint8ClampedArray; size: number } {
  const modules = Number(/viewBox="0 0 (\d+) \d+"/.exec(svg)![1])
  const path = /<path[^>]*stroke="#000000"[^>]*d="([^"]+)"/.exec(svg)![1]
  const size = modules * scale
  const data = new Uint8ClampedArray(size * size * 4).fill(255)
  let x = 0
  let y = 0
  for (const [, cmd, a, b] of path.matchAll(/([Mmh])(-?[\d.]+)(?:\s(-?[\d.]+))?/g)) {
    if (cmd === 'M') [x, y] = [Number(a), Number(b)]
    else if (cmd === 'm') [x, y] = [x + Number(a), y + Number(b)]
    else {
      const row = Math.floor(y)
      for (let mx = x; mx < x + Number(a); mx++)
        for (let py = row * scale; py < (row + 1) * scale; py++)
          for (let px = mx * scale; px < (mx + 1) * scale; px++) {
            const i = (py * size + px) * 4
            data[i] = data[i + 1] = data[i + 2] = 0
          }
      x += Number(a)
    }
  }
  return { data, size }
}

const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
let t: TestApp
let developer: Agent

beforeAll(async () => {
  t = await buildApp({ clock })
  developer = await signInAs(t.app, 'developer')
})
afterAll(() => t.close())

async function playtest(players: number) {
  const recipeIds = [
    await addRecipe(t.knex, 'Field A bare'),
    await addRecipe(t.knex, 'Field A compound'),
    await addRecipe(t.knex, 'Field A fibre'),
  ]
  const { id, session } = await openStudy(developer, {
    name: 'On your own violin',
    format: 'playtest',
    recipeIds,
    duplicates: 1,
    playerTitle: 'Strings to try at home',
    playerMessage: 'Play each set for two days before rating it.',
    deadline: isoDay(clock.now(), 21),
  })
  const playerIds = await addPlayers(t.knex, players)
  await developer.post(`/api/sessions/${id}/invitations`).send({ playerIds })
  const names = (await t.knex('recipes').whereIn('id', recipeIds).select('name')).map(
    (r: { name: string }) => r.name,
  )
  return { id, session, names }
}

describe('play-test logistics', () => {
  it('allocates coded sets to each player in a balanced order, with a packing list for staff', async () => {
    const { id, session, names } = await playtest(6)

    const res = await developer.get(`/api/sessions/${id}/labels`)
    const key = await developer.get(`/api/sessions/${id}/packing-list`)

    expect(session).toMatchObject({ trialCount: 4, status: 'open' })
    expect(res.status).toBe(200)
    expect(key.status).toBe(200)
    const sheet = res.body
    const packing = key.body
    expect(sheet.players).toHaveLength(6)
    expect(packing.players.map((p: { playerCode: string }) => p.playerCode)).toEqual(
      sheet.players.map((p: { playerCode: string }) => p.playerCode),
    )
    for (const [i, p] of sheet.players.entries()) {
      expect(p.sets.map((s: { position: number }) => s.position)).toEqual([1, 2, 3, 4])
      for (const s of p.sets) expect(String(s.code)).toMatch(/^[1-9]\d\d$/)
      expect(packing.players[i].lines.map((l: { code: number }) => l.code)).toEqual(
        p.sets.map((s: { code: number }) => s.code),
      )
      expect(names).toContain(packing.players[i].lines[0].recipeName)
    }
    // Three recipes: over six players (a Williams block) each recipe opens twice.
    const firstRecipes = packing.players.map(
      (p: { lines: { recipeName: string }[] }) => p.lines[0].recipeName,
    )
    for (const name of names) expect(firstRecipes.filter((n: string) => n === name)).toHaveLength(2)
    // The same recipe carries the same blind code for every player.
    const codeOf = new Map<string, Set<number>>()
    for (const p of packing.players)
      for (const l of p.lines)
        (codeOf.get(l.recipeName) ?? codeOf.set(l.recipeName, new Set()).get(l.recipeName)!).add(
          l.code,
        )
    // One code for the first fitting and one for the hidden repeat of a set.
    for (const codes of codeOf.values()) expect(codes.size).toBeLessThanOrEqual(2)
    expect(sheet.caution).toMatch(/eye protection/)
    expect(sheet.caution).toMatch(/up to pitch slowly/)
    expect(sheet.caution).toMatch(/luthier/)
  })

  it('prints QR codes that decode to the rating form of that set for that player', async () => {
    const { id, names } = await playtest(2)

    const sheet = (await developer.get(`/api/sessions/${id}/labels`)).body
    const label = sheet.players[1].sets[2]
    const { data, size } = rasterise(label.qrSvg)
    const decoded = jsQR(data, size, size)
    const token = /\/p\/([^?]+)\?set=/.exec(label.url)![1]
    const landing = await request(t.app)
      .get('/api/player/invitation')
      .set('X-Invitation-Token', token)

    expect(label.qrSvg).toMatch(/^<svg/)
    expect(label.url).toMatch(new RegExp(`^http://localhost:3000/p/[\\w.-]+\\?set=${label.code}$`))
    expect(decoded?.data).toBe(label.url)
    expect(landing.status).toBe(200)
    expect(landing.body.cautions[0]).toMatch(/eye protection/)
    expect(landing.body.trialCount).toBe(4)
    // What reaches the player (the label and the page it opens) names no recipe.
    const playerSide = JSON.stringify({ sets: sheet.players[1].sets, landing: landing.body })
    for (const name of names) expect(playerSide).not.toContain(name)
  })

  it('previews a play-test as coded sets without clips', async () => {
    const { id } = await playtest(1)

    const res = await developer.get(`/api/sessions/${id}/preview`).query({ player: 1 })

    expect(res.body.plan.trials).toHaveLength(4)
    for (const trial of res.body.plan.trials) {
      expect(trial.clips).toEqual([])
      expect(String(trial.setCode)).toMatch(/^\d{3}$/)
    }
    expect(res.body.plan.cautions[0]).toMatch(/luthier/)
  })

  it('leaves revoked players off the sheet and refuses labels for listening sessions', async () => {
    const { id } = await playtest(3)
    const invs = (await developer.get(`/api/sessions/${id}/invitations`)).body.invitations
    await developer.post(`/api/invitations/${invs[0].id}/revoke`)
    const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1)
    const listening = await developer.post('/api/sessions').send({
      name: 'Listening only',
      playerTitle: 'Listening round',
      format: 'pair',
      recipeIds,
      clipSets,
      deadline: isoDay(clock.now(), 5),
    })

    const sheet = await developer.get(`/api/sessions/${id}/labels`)
    const refused = await developer.get(`/api/sessions/${listening.body.session.id}/labels`)

    expect(sheet.body.players.map((p: { playerCode: string }) => p.playerCode)).toEqual(
      invs.slice(1).map((i: { playerCode: string }) => i.playerCode),
    )
    expect(refused.status).toBe(409)
  })
})
