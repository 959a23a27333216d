import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildApp, signInAs, uniqueEmail, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'

interface Player {
  id: number
  code: string
  name: string | null
  email: string | null
  instruments: string[]
  level: string
  region: string
  consentDate: string | null
  notes: string
  status: string
}

let t: TestApp
let admin: Agent
beforeAll(async () => {
  t = await buildApp()
  admin = await signInAs(t.app, 'admin')
})
afterAll(() => t.close())

let regionCounter = 0
/** A region name no other test uses, so list filters can be checked on this test's rows alone. */
const freshRegion = () => `Testmarch-${++regionCounter}-${Math.random().toString(36).slice(2, 6)}`

async function addPlayer(fields: Partial<Player> = {}): Promise<Player> {
  const res = await admin.post('/api/panel/players').send({
    name: 'Ottoline Farrant',
    email: uniqueEmail('player'),
    instruments: ['violin'],
    level: 'student',
    ...fields,
  })
  expect(res.status).toBe(201)
  return res.body.player
}

const playerCount = async () => Number((await t.knex('players').count({ n: '*' }))[0].n)

describe('adding a player', () => {
  it('stores the player with a code and the given details', async () => {
    const email = uniqueEmail('new')
    const player = await addPlayer({
      name: 'Benedikt Sorensen',
      email: email.toUpperCase(),
      instruments: ['cello', 'double bass'],
      level: 'professional',
      region: 'Lowlands',
      consentDate: '2026-10-01',
      notes: 'Prefers mornings',
    })

    expect(player).toMatchObject({
      name: 'Benedikt Sorensen',
      email,
      instruments: ['cello', 'double bass'],
      level: 'professional',
      region: 'Lowlands',
      consentDate: '2026-10-01',
      notes: 'Prefers mornings',
      status: 'active',
    })
    expect(player.code).toMatch(/^P-[A-Z0-9]{5}$/)
  })

  it('names every missing field, and stores nothing', async () => {
    const before = await playerCount()

    const res = await admin.post('/api/panel/players').send({})

    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('validation_failed')
    expect(Object.keys(res.body.error.fields).sort()).toEqual([
      'email',
      'instruments',
      'level',
      'name',
    ])
    expect(await playerCount()).toBe(before)
  })

  it.each([
    ['an unknown field', { nickname: 'Fiddles' }, 'nickname', 'Unknown field'],
    ['an over-long name', { name: 'N'.repeat(121) }, 'name', 'At most 120 characters'],
    ['a bad e-mail', { email: 'at-nowhere' }, 'email', 'Not a valid e-mail address'],
    ['a bad level', { level: 'virtuoso' }, 'level', 'Level is one of'],
    ['an unknown instrument', { instruments: ['banjo'] }, 'instruments', 'Instruments are'],
    ['no instrument', { instruments: [] }, 'instruments', 'At least one instrument'],
    ['an instrument twice', { instruments: ['viola', 'viola'] }, 'instruments', 'listed twice'],
    ['an impossible date', { consentDate: '2026-02-30' }, 'consentDate', 'Not a real date'],
    ['a date in another form', { consentDate: '30.01.2026' }, 'consentDate', 'YYYY-MM-DD'],
    ['an over-long region', { region: 'R'.repeat(81) }, 'region', 'At most 80 characters'],
  ])('refuses %s with a message on that field', async (_what, change, field, message) => {
    const before = await playerCount()

    const res = await admin.post('/api/panel/players').send({
      name: 'Valid Name',
      email: uniqueEmail('valid'),
      instruments: ['violin'],
      level: 'teacher',
      ...change,
    })

    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields)).toEqual([field])
    expect(res.body.error.fields[field].join(' ')).toContain(message)
    expect(await playerCount()).toBe(before)
  })

  it('refuses an e-mail already on the panel with 409', async () => {
    const first = await addPlayer()

    const res = await admin.post('/api/panel/players').send({
      name: 'Someone Else',
      email: first.email!.toUpperCase(),
      instruments: ['viola'],
      level: 'amateur',
    })

    expect(res.status).toBe(409)
    expect(res.body.error.fields.email).toEqual(['Already on the panel'])
  })
})

describe('listing the panel', () => {
  let region: string
  let rows: Record<string, Player>
  beforeAll(async () => {
    region = freshRegion()
    rows = {
      ada: await addPlayer({
        name: 'Ada Brightwater',
        region,
        instruments: ['violin'],
        level: 'professional',
        consentDate: '2026-03-01',
      }),
      cyr: await addPlayer({
        name: 'Cyrus Dunmore',
        region,
        instruments: ['cello'],
        level: 'student',
        consentDate: null,
      }),
      bea: await addPlayer({
        name: 'Bea Calloway',
        region,
        instruments: ['viola', 'violin'],
        level: 'student',
        consentDate: '2026-01-15',
      }),
      dov: await addPlayer({
        name: 'Dov Eastwick',
        region,
        instruments: ['violin'],
        level: 'teacher',
      }),
    }
    await saveEdit(admin, `/api/panel/players/${rows.dov.id}`, { status: 'inactive' })
  })

  const names = async (query: Record<string, string>) => {
    const res = await admin.get('/api/panel/players').query({ q: region, ...query })
    expect(res.status).toBe(200)
    return res.body.players.map((p: Player) => p.name)
  }

  it('shows active players by name by default', async () => {
    expect(await names({})).toEqual(['Ada Brightwater', 'Bea Calloway', 'Cyrus Dunmore'])
  })

  it('searches name, e-mail and code with q', async () => {
    const byName = await admin.get('/api/panel/players').query({ q: 'Brightwater' })
    const byCode = await admin.get('/api/panel/players').query({ q: rows.cyr.code })
    const byEmail = await admin.get('/api/panel/players').query({ q: rows.bea.email! })

    expect(byName.body.players.map((p: Player) => p.id)).toEqual([rows.ada.id])
    expect(byCode.body.players.map((p: Player) => p.id)).toEqual([rows.cyr.id])
    expect(byEmail.body.players.map((p: Player) => p.id)).toEqual([rows.bea.id])
  })

  it('takes % and _ in a search literally instead of as wildcards', async () => {
    const percent = await admin.get('/api/panel/players').query({ q: '%' })
    const underscore = await admin.get('/api/panel/players').query({ q: '_' })

    expect(percent.body.players).toEqual([])
    expect(underscore.body.players).toEqual([])
  })

  it('filters by instrument, level and status', async () => {
    expect(await names({ instrument: 'violin' })).toEqual(['Ada Brightwater', 'Bea Calloway'])
    expect(await names({ level: 'student' })).toEqual(['Bea Calloway', 'Cyrus Dunmore'])
    expect(await names({ status: 'inactive' })).toEqual(['Dov Eastwick'])
    expect(await names({ status: 'all' })).toHaveLength(4)
  })

  it('sorts by the chosen column and order, players without a value last', async () => {
    expect(await names({ sort: 'name', order: 'desc' })).toEqual([
      'Cyrus Dunmore',
      'Bea Calloway',
      'Ada Brightwater',
    ])
    expect(await names({ sort: 'consentDate' })).toEqual([
      'Bea Calloway',
      'Ada Brightwater',
      'Cyrus Dunmore',
    ])
  })

  it('refuses an unknown filter value or sort column with 422', async () => {
    const res = await admin.get('/api/panel/players').query({ instrument: 'lute', sort: 'email' })

    expect(res.status).toBe(422)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['instrument', 'sort'])
  })
})

describe('editing a player', () => {
  it('changes the given fields only', async () => {
    const player = await addPlayer({ region: 'Upland', notes: 'Left-handed bow hold' })

    const res = await saveEdit(admin, `/api/panel/players/${player.id}`, {
      name: 'Ottoline Farrant-Wilde',
      level: 'teacher',
    })

    expect(res.status).toBe(200)
    expect(res.body.player).toMatchObject({
      name: 'Ottoline Farrant-Wilde',
      level: 'teacher',
      region: 'Upland',
      notes: 'Left-handed bow hold',
      code: player.code,
    })
  })

  it("refuses another player's e-mail with 409 and an empty change with 422", async () => {
    const a = await addPlayer()
    const b = await addPlayer()

    const taken = await saveEdit(admin, `/api/panel/players/${b.id}`, { email: a.email })
    const empty = await saveEdit(admin, `/api/panel/players/${b.id}`, {})

    expect(taken.status).toBe(409)
    expect(empty.status).toBe(422)
  })

  it('deactivates a player, who then leaves the default list', async () => {
    const region = freshRegion()
    const player = await addPlayer({ region })

    const res = await saveEdit(admin, `/api/panel/players/${player.id}`, { status: 'inactive' })
    const listed = await admin.get('/api/panel/players').query({ q: region })

    expect(res.body.player.status).toBe('inactive')
    expect(listed.body.players).toEqual([])
  })
})

describe('addressing a player', () => {
  it('answers 422 for an id that is not a number and 404 for one that does not exist', async () => {
    const bad = await admin.get('/api/panel/players/first')
    const missing = await admin.get('/api/panel/players/999999')

    expect(bad.status).toBe(422)
    expect(bad.body.error.fields.id).toBeDefined()
    expect(missing.status).toBe(404)
    expect(missing.body.error.code).toBe('not_found')
  })
})

describe('deleting a player on request', () => {
  it('removes name, e-mail, region and notes, keeps the code, and keeps personal data out of the audit', async () => {
    const email = uniqueEmail('forget-me')
    const player = await addPlayer({
      name: 'Henrietta Quarrington',
      email,
      region: 'Saltmarsh Vale',
      notes: 'Plays with a shoulder rest',
      consentDate: '2026-05-05',
    })
    await saveEdit(admin, `/api/panel/players/${player.id}`, { notes: 'Allergic to rosin dust' })

    const res = await admin.delete(`/api/panel/players/${player.id}`)
    const stored = await admin.get(`/api/panel/players/${player.id}`)
    const audit = await admin.get('/api/audit').query({ q: player.code })

    expect(res.status).toBe(200)
    expect(stored.body.player).toMatchObject({
      code: player.code,
      name: null,
      email: null,
      region: '',
      notes: '',
      consentDate: null,
      status: 'deleted',
    })
    const actions = audit.body.entries.map((e: { action: string }) => e.action)
    expect(actions).toEqual(['panel.player_erased', 'panel.player_updated', 'panel.player_added'])
    const text = JSON.stringify(audit.body.entries)
    for (const personal of ['Henrietta', 'Quarrington', email, 'Saltmarsh', 'shoulder', 'rosin']) {
      expect(text).not.toContain(personal)
    }
  })

  it('frees the e-mail and refuses to touch the deleted record again', async () => {
    const player = await addPlayer()

    await admin.delete(`/api/panel/players/${player.id}`)
    const again = await admin.delete(`/api/panel/players/${player.id}`)
    const edit = await saveEdit(admin, `/api/panel/players/${player.id}`, { name: 'Back Again' })
    const reuse = await admin.post('/api/panel/players').send({
      name: 'Ottoline Farrant',
      email: player.email,
      instruments: ['violin'],
      level: 'student',
    })

    expect(again.status).toBe(404)
    expect(edit.status).toBe(404)
    expect(reuse.status).toBe(201)
  })
})

describe('the panel summary', () => {
  it('counts active players by instrument and level, and every status', async () => {
    const before = (await admin.get('/api/panel/summary')).body

    const bassist = await addPlayer({ instruments: ['double bass', 'cello'], level: 'amateur' })
    const leaving = await addPlayer({ instruments: ['viola'], level: 'teacher' })
    const gone = await addPlayer({ instruments: ['viola'], level: 'teacher' })
    await saveEdit(admin, `/api/panel/players/${leaving.id}`, { status: 'inactive' })
    await admin.delete(`/api/panel/players/${gone.id}`)
    const after = (await admin.get('/api/panel/summary')).body

    expect(bassist.status).toBe('active')
    expect(after.total).toBe(before.total + 1)
    expect(after.byInstrument['double bass']).toBe(before.byInstrument['double bass'] + 1)
    expect(after.byInstrument.cello).toBe(before.byInstrument.cello + 1)
    expect(after.byInstrument.viola).toBe(before.byInstrument.viola)
    expect(after.byLevel.amateur).toBe(before.byLevel.amateur + 1)
    expect(after.byLevel.teacher).toBe(before.byLevel.teacher)
    expect(after.byStatus).toEqual({
      active: before.byStatus.active + 1,
      inactive: before.byStatus.inactive + 1,
      deleted: before.byStatus.deleted + 1,
    })
  })
})

describe('importing a panel CSV', () => {
  const upload = (content: string | Buffer, filename = 'panel.csv') =>
    admin
      .post('/api/panel/import')
      .attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content), filename)

  const HEADER = 'name,email,instruments,level,region,consent_date,notes'

  it('imports every row of a good file', async () => {
    const region = freshRegion()
    const csv = [
      HEADER,
      `Lucan Mirrlees,lucan.${region}@example.test,violin;viola,Professional,${region},2026-04-01,`,
      `"Mabyn Trevelyan, Jr.",mabyn.${region}@example.test,cello,student,${region},,"Says ""hello"""`,
      `Nesta Pryor,nesta.${region}@example.test,double bass|cello,teacher,${region},,`,
      '',
    ].join('\r\n')

    const res = await upload(`\ufeff${csv}`)
    const listed = await admin.get('/api/panel/players').query({ q: region })

    expect(res.status).toBe(201)
    expect(res.body).toEqual({ imported: 3 })
    const players: Player[] = listed.body.players
    expect(players.map((p) => p.name)).toEqual([
      'Lucan Mirrlees',
      'Mabyn Trevelyan, Jr.',
      'Nesta Pryor',
    ])
    expect(players[0]).toMatchObject({
      instruments: ['violin', 'viola'],
      level: 'professional',
      consentDate: '2026-04-01',
    })
    expect(players[1]).toMatchObject({ consentDate: null, notes: 'Says "hello"' })
    expect(players[2].instruments).toEqual(['double bass', 'cello'])
  })

  it('accepts a file with only the required columns', async () => {
    const region = freshRegion()
    const res = await upload(
      `name,email,instruments,level\nPip Allard,pip.${region}@example.test,viola,amateur\n`,
    )

    expect(res.status).toBe(201)
    expect(res.body.imported).toBe(1)
  })

  it('refuses a file with bad rows as a whole, naming each bad line, and stores nothing', async () => {
    const onPanel = await addPlayer()
    const before = await playerCount()
    const csv = [
      HEADER,
      'Good Row,good.row@example.test,violin,student,,,',
      'Bad Mail,not-an-address,violin,student,,,',
      'Odd Instrument,odd.instrument@example.test,lute,student,,,',
      'Twice Over,GOOD.ROW@example.test,viola,teacher,,,',
      `Already Here,${onPanel.email},cello,amateur,,,`,
      'Bad Date,bad.date@example.test,cello,amateur,,2026-02-30,',
    ].join('\n')

    const res = await upload(csv)

    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('validation_failed')
    const rows: { row: number; errors: string[] }[] = res.body.error.rows
    expect(rows.map((r) => r.row)).toEqual([3, 4, 5, 6, 7])
    expect(rows[0].errors.join(' ')).toMatch(/^email:/)
    expect(rows[1].errors.join(' ')).toMatch(/instruments/)
    expect(rows[2].errors).toEqual(['email: the same address is on line 2'])
    expect(rows[3].errors).toEqual(['email: already on the panel'])
    expect(rows[4].errors.join(' ')).toMatch(/consent_date: Not a real date/)
    expect(await playerCount()).toBe(before)
    const goodRow = await admin.get('/api/panel/players').query({ q: 'good.row@example.test' })
    expect(goodRow.body.players).toEqual([])
  })

  it.each([
    ['a wrong header', 'full_name,mail,instrument,grade\nA,a@example.test,violin,student\n'],
    ['an extra column', `${HEADER},shoe_size\nA,a@example.test,violin,student,,,,42\n`],
    ['a header and no rows', `${HEADER}\n`],
    ['an empty file', ''],
    ['a row with too many cells', `${HEADER}\nA,a@example.test,violin,student,,,,surplus\n`],
  ])('refuses %s with 400', async (_what, content) => {
    const before = await playerCount()

    const res = await upload(content)

    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('bad_request')
    expect(await playerCount()).toBe(before)
  })

  it('names the missing and unknown columns of a wrong header', async () => {
    const res = await upload('name,mail,instruments,level\nA,a@example.test,violin,student\n')

    expect(res.body.error.message).toMatch(/missing column\(s\): email/)
    expect(res.body.error.message).toMatch(/unknown column\(s\): mail/)
  })

  it('refuses a binary file with 400', async () => {
    const png = Buffer.from([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x48, 0x44,
      0x52, 0x00, 0x00, 0x01, 0x00,
    ])

    const res = await upload(png, 'panel.csv')

    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('bad_request')
  })

  it('refuses a file over the size limit with 413 and stores nothing', async () => {
    const before = await playerCount()
    const row = 'Filler Row,filler@example.test,violin,student,,,' + 'x'.repeat(200) + '\n'
    const big = HEADER + '\n' + row.repeat(Math.ceil(1_100_000 / row.length))

    const res = await upload(big)

    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
    expect(await playerCount()).toBe(before)
  })

  it('refuses a request without a file, or with the file in another field, with 400', async () => {
    const none = await admin.post('/api/panel/import')
    // A JSON body is the wrong kind of request for an upload altogether (RFC 9110 §15.5.16).
    const json = await admin.post('/api/panel/import').send({})
    const elsewhere = await admin
      .post('/api/panel/import')
      .attach('upload', Buffer.from(`${HEADER}\n`), 'panel.csv')

    expect(none.status).toBe(400)
    expect(json.status).toBe(415)
    expect(elsewhere.status).toBe(400)
  })

  it('records an import in the audit log by count, without names', async () => {
    const region = freshRegion()
    await upload(
      `name,email,instruments,level\nQuill Hartigan,quill.${region}@example.test,viola,amateur\n`,
    )

    const audit = await admin.get('/api/audit').query({ action: 'panel.imported' })

    expect(audit.body.entries[0].details).toEqual({ count: 1 })
    expect(JSON.stringify(audit.body.entries)).not.toContain('Quill')
  })
})
