import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock } from '../../server/clock'
import { buildApp, createStaff, signInAs, type Agent, type TestApp } from './helpers'
import { revisionOf } from './editing'
import { addClip, addPlayers, addRecipe, isoDay, studyFixture } from './sessionFixtures'

// Two people editing the same thing. Without a revision both saves succeed and the first change
// silently disappears: the "lost update" of concurrent editing, which HTTP answers with a
// precondition on the version the client read. The status is 409 Conflict, "the request could
// not be completed due to a conflict with the current state of the target resource" (RFC 9110,
// §15.5.10; the wording quoted from memory). Each kind a staff form edits is walked the same way.

const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
let t: TestApp
let admin: Agent
let developer: Agent
let secondAdmin: Agent

beforeAll(async () => {
  t = await buildApp({ clock })
  admin = await signInAs(t.app, 'admin')
  developer = await signInAs(t.app, 'developer')
  secondAdmin = (await createStaff(t, admin, 'admin')).agent
})
afterAll(() => t.close())

interface Kind {
  kind: string
  /** The key the row is answered under, and the table it is stored in. */
  key: string
  table: string
  /** Makes a fresh row; returns its id. */
  make: () => Promise<number>
  /** Two staff members who may both edit it. */
  editors: () => [Agent, Agent]
  field: string
  first: unknown
  second: unknown
  /** Another route that changes the row, as its own control does (not the edit form). */
  otherChange: (id: number) => Promise<{ status: number }>
}

async function newSession(): Promise<number> {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Revision')
  const res = await developer.post('/api/sessions').send({
    name: 'Evening brightness',
    purpose: 'Which winding sounds brighter',
    playerTitle: 'Evening listening',
    format: 'pair',
    recipeIds,
    clipSets,
    deadline: isoDay(clock.now(), 14),
  })
  if (res.status !== 201) throw new Error(`create: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body.session.id as number
}

const KINDS: Kind[] = [
  {
    kind: 'session',
    key: 'session',
    table: 'sessions',
    make: newSession,
    editors: () => [developer, admin],
    field: 'purpose',
    first: 'Which winding sounds brighter under the bow',
    second: 'Which winding sounds darker',
    otherChange: (id) => admin.post(`/api/sessions/${id}/open`).send({ acceptSameTake: true }),
  },
  {
    kind: 'recipe',
    key: 'recipe',
    table: 'recipes',
    make: () => addRecipe(t.knex, 'Revision recipe'),
    editors: () => [developer, admin],
    field: 'notes',
    first: 'Wound on the new lathe',
    second: 'Wound by hand',
    otherChange: (id) => admin.post(`/api/recipes/${id}/archive`),
  },
  {
    kind: 'clip',
    key: 'clip',
    table: 'clips',
    make: async () => addClip(t.knex, await addRecipe(t.knex, 'Revision clip recipe')),
    editors: () => [developer, admin],
    field: 'notes',
    first: 'Bow change at bar two',
    second: 'Clean take',
    otherChange: (id) => admin.post(`/api/clips/${id}/archive`),
  },
  {
    kind: 'player',
    key: 'player',
    table: 'players',
    make: async () => (await addPlayers(t.knex, 1))[0],
    editors: () => [admin, secondAdmin],
    field: 'notes',
    first: 'Prefers mornings',
    second: 'Plays a five-string',
    // The panel list's Deactivate button: it sends the revision the list was loaded at.
    otherChange: async (id) => {
      const list = await admin.get('/api/panel/players').query({ status: 'all' })
      const row = (list.body.players as { id: number; revision: number }[]).find(
        (p) => p.id === id,
      )!
      return admin
        .patch(`/api/panel/players/${id}`)
        .send({ status: 'inactive', revision: row.revision })
    },
  },
]

const pathOf = (k: Kind, id: number) =>
  k.kind === 'player' ? `/api/panel/players/${id}` : `/api/${k.table}/${id}`

const auditCount = async () => Number((await t.knex('audit_log').count({ n: '*' }))[0].n)

describe.each(KINDS)('editing one $kind from two forms', (k) => {
  it('keeps the first save and refuses the second, made from the older revision, with 409', async () => {
    const id = await k.make()
    const path = pathOf(k, id)
    const [first, second] = k.editors()
    const loadedByFirst = await revisionOf(first, path)
    const loadedBySecond = await revisionOf(second, path)
    expect(loadedBySecond).toBe(loadedByFirst)

    const saved = await first.patch(path).send({ [k.field]: k.first, revision: loadedByFirst })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect(saved.body[k.key].revision).toBe(loadedByFirst + 1)
    const auditBefore = await auditCount()

    const refused = await second.patch(path).send({ [k.field]: k.second, revision: loadedBySecond })
    expect(refused.status).toBe(409)
    expect(refused.body.error.code).toBe('conflict')
    expect(refused.body.error.message).toMatch(
      new RegExp(`Someone saved this ${k.kind} after you opened it`),
    )
    expect(refused.body.error.currentRevision).toBe(loadedByFirst + 1)

    const now = await first.get(path)
    expect(now.body[k.key][k.field]).toBe(k.first)
    expect(now.body[k.key].revision).toBe(loadedByFirst + 1)
    expect(await auditCount()).toBe(auditBefore)

    // Loaded again, the second person's save goes through over the newest revision.
    const again = await second
      .patch(path)
      .send({ [k.field]: k.second, revision: await revisionOf(second, path) })
    expect(again.status).toBe(200)
    expect(again.body[k.key][k.field]).toBe(k.second)
    expect(again.body[k.key].revision).toBe(loadedByFirst + 2)
  })

  it('refuses a save that names no revision, and changes nothing', async () => {
    const id = await k.make()
    const path = pathOf(k, id)
    const before = (await admin.get(path)).body[k.key]

    const res = await admin.patch(path).send({ [k.field]: k.first })

    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('validation_failed')
    expect(Object.keys(res.body.error.fields)).toEqual(['revision'])
    expect((await admin.get(path)).body[k.key]).toEqual(before)
  })

  it('refuses a save from a form loaded before another route changed the row', async () => {
    const id = await k.make()
    const path = pathOf(k, id)
    const [editor] = k.editors()
    const loaded = await revisionOf(editor, path)

    expect((await k.otherChange(id)).status).toBe(200)
    const stale = await editor.patch(path).send({ [k.field]: k.second, revision: loaded })

    expect(stale.status).toBe(409)
    expect(stale.body.error.code).toBe('conflict')
    expect(stale.body.error.currentRevision).toBe(loaded + 1)
    expect((await editor.get(path)).body[k.key][k.field]).not.toBe(k.second)
  })
})

describe('other writes that move a revision', () => {
  it('a session closed after its form was loaded is refused as closed, not saved', async () => {
    const id = await newSession()
    await developer.post(`/api/sessions/${id}/open`).send({ acceptSameTake: true }).expect(200)
    const loaded = await revisionOf(developer, `/api/sessions/${id}`)
    await admin.post(`/api/sessions/${id}/close`).expect(200)

    const res = await developer
      .patch(`/api/sessions/${id}`)
      .send({ name: 'Late', revision: loaded })

    expect(res.status).toBe(409)
    expect((await developer.get(`/api/sessions/${id}`)).body.session.name).toBe(
      'Evening brightness',
    )
  })

  it('a stale session form that changes nothing is refused too, so it is reloaded', async () => {
    const id = await newSession()
    const loaded = await revisionOf(developer, `/api/sessions/${id}`)
    await admin
      .patch(`/api/sessions/${id}`)
      .send({ name: 'Renamed by the admin', revision: loaded })
      .expect(200)

    const res = await developer
      .patch(`/api/sessions/${id}`)
      .send({ name: 'Evening brightness', revision: loaded })

    expect(res.status).toBe(409)
    expect((await developer.get(`/api/sessions/${id}`)).body.session.name).toBe(
      'Renamed by the admin',
    )
  })

  it("deleting a recipe's parent moves the child's revision: its old form cannot restore it", async () => {
    const parent = await addRecipe(t.knex, 'Revision parent')
    const child = await addRecipe(t.knex, 'Revision child')
    await developer
      .patch(`/api/recipes/${child}`)
      .send({ parentId: parent, revision: await revisionOf(developer, `/api/recipes/${child}`) })
      .expect(200)
    const loaded = await revisionOf(admin, `/api/recipes/${child}`)
    await developer.delete(`/api/recipes/${parent}`).expect(200)

    const res = await admin
      .patch(`/api/recipes/${child}`)
      .send({ parentId: parent, notes: 'Still from the parent', revision: loaded })

    expect(res.status).toBe(409)
    expect((await admin.get(`/api/recipes/${child}`)).body.recipe.parentId).toBeNull()
  })

  it('a player erased after the form was loaded is not brought back by a stale save', async () => {
    const [id] = await addPlayers(t.knex, 1)
    const loaded = await revisionOf(admin, `/api/panel/players/${id}`)
    await secondAdmin.delete(`/api/panel/players/${id}`).expect(200)

    const res = await admin
      .patch(`/api/panel/players/${id}`)
      .send({ name: 'Back Again', revision: loaded })

    expect(res.status).toBe(404)
    const row = await t.knex('players').where({ id }).first('name', 'status', 'revision')
    expect(row).toEqual({ name: null, status: 'deleted', revision: loaded + 1 })
  })
})
