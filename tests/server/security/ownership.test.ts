import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mediaFolders } from '../../../server/clips/storage'
import {
  buildApp,
  createStaff,
  memoryMailbox,
  signInAs,
  type Agent,
  type TestApp,
} from '../helpers'
import { isoDay, openStudy, studyFixture } from '../sessionFixtures'
import { giveAudio } from '../playerFixtures'

// The two ways round the ownership rule that were open: a colleague's study read through a
// time point added to it, and its label sheet (live player links) or packing list (the key).

let t: TestApp
let mediaDir: string
let owner: Agent
let colleague: Agent
let admin: Agent
let studyId: number

beforeAll(async () => {
  mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-owner-'))
  mediaFolders(mediaDir)
  t = await buildApp({ config: { mediaDir }, mailbox: memoryMailbox() })
  admin = await signInAs(t.app, 'admin')
  owner = await signInAs(t.app, 'developer')
  colleague = (await createStaff(t, admin, 'developer')).agent
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Aging')
  await giveAudio(
    t.knex,
    mediaDir,
    clipSets.flatMap((s) => s.clipIds),
  )
  studyId = (
    await openStudy(owner, {
      name: 'Aging study',
      format: 'rating',
      recipeIds,
      clipSets,
      deadline: isoDay(t.app.locals.ctx.clock.now(), 14),
    })
  ).id
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

const later = () => ({ label: 'week 4', deadline: isoDay(t.app.locals.ctx.clock.now(), 40) })

describe('time points of a colleague’s study', () => {
  it('are refused, and nothing is created', async () => {
    const before = await t.knex('sessions').count({ n: '*' }).first()
    const res = await colleague.post(`/api/sessions/${studyId}/time-points`).send(later())
    expect(res.status).toBe(403)
    expect(await t.knex('sessions').count({ n: '*' }).first()).toEqual(before)
  })

  it('added by an admin belong to the study’s owner, whose findings they stay', async () => {
    const res = await admin.post(`/api/sessions/${studyId}/time-points`).send(later())
    expect(res.status).toBe(201)
    const id = res.body.session.id as number
    const made = await t.knex('sessions').where({ id }).first('created_by')
    const first = await t.knex('sessions').where({ id: studyId }).first('created_by')
    expect(made.created_by).toBe(first.created_by)
    expect((await owner.get(`/api/findings/${id}`)).status).toBe(200)
    expect((await colleague.get(`/api/findings/${id}`)).status).toBe(403)
  })
})

describe('what reaches a colleague’s players', () => {
  it('label sheets and packing lists are refused to other developers and analysts', async () => {
    const analyst = await signInAs(t.app, 'analyst')
    for (const path of ['labels', 'packing-list', 'invitations']) {
      const res = await colleague.get(`/api/sessions/${studyId}/${path}`)
      expect(res.status, path).toBe(403)
      expect(JSON.stringify(res.body), path).not.toMatch(/\/p\//)
    }
    expect((await analyst.get(`/api/sessions/${studyId}/labels`)).status).toBe(403)
    expect((await analyst.get(`/api/sessions/${studyId}/packing-list`)).status).toBe(403)
  })

  it('the session list still shows the study, with who owns it', async () => {
    const list = (await colleague.get('/api/sessions')).body.sessions as {
      id: number
      createdById: number | null
    }[]
    const row = list.find((s) => s.id === studyId)
    const first = await t.knex('sessions').where({ id: studyId }).first('created_by')
    expect(row?.createdById).toBe(first.created_by)
  })
})
