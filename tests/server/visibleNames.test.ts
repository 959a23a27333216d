import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildApp, signInAs, uniqueEmail, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import { addClip, addRecipe, isoDay, studyFixture } from './sessionFixtures'
import { hasVisibleCharacter, VISIBLE_MESSAGE } from '../../shared/schemas/visibleText'
import { playerCsvRow } from '../../shared/schemas/panel'
import { zodFields } from '../../shared/schemas/fieldErrors'

// Character properties below are those of the Unicode Character Database: General_Category from
// UnicodeData.txt, Variation_Selector from PropList.txt, Default_Ignorable_Code_Point from
// DerivedCoreProperties.txt. Which characters String.prototype.trim removes is ECMAScript's
// WhiteSpace and LineTerminator (ECMA-262, "White Space" and "Line Terminators").

/** Values that draw nothing on screen. */
const BLANK: [string, string][] = [
  ['two zero-width spaces (U+200B, Cf)', '\u200b\u200b'],
  ['a word joiner (U+2060, Cf)', '\u2060'],
  ['spaces and a no-break space (U+00A0, Zs)', '   \u00a0'],
  ['a right-to-left override (U+202E, Cf)', '\u202e'],
  ['a byte order mark and a zero-width joiner (U+FEFF, U+200D, Cf)', '\ufeff\u200d'],
  ['an ideographic space (U+3000, Zs)', '\u3000'],
  ['a line and a paragraph separator (U+2028 Zl, U+2029 Zp)', '\u2028\u2029'],
  ['a bell and a delete (U+0007, U+007F, Cc)', '\u0007\u007f'],
  ['variation selectors 16 and 17 (U+FE0F, U+E0100)', '\ufe0f\u{e0100}'],
  ['a soft hyphen (U+00AD, Cf)', '\u00ad'],
  ['Hangul fillers (U+3164, U+115F, default-ignorable)', '\u3164\u115f'],
  ['a combining grapheme joiner (U+034F, default-ignorable)', '\u034f'],
  ['a blank braille cell (U+2800)', '\u2800'],
]

/** Names with accents, scripts, emoji and the joiners inside them: all must be kept as typed. */
const VISIBLE: [string, string][] = [
  ['accents', 'Élodie Brassard-Nguyễn'],
  ['a dash and an emoji', 'Harewood A — ébène 🎻'],
  ['Japanese', '弦の試作 3'],
  ['Arabic, right to left', 'سارة الحداد'],
  ['an emoji joined with U+200D', '👩‍🔬 bench set'],
  ['an emoji with its variation selector', 'Warm ❤️'],
  ['a soft hyphen inside a word', 'Anna\u00adLena'],
]

interface Refusal {
  error: { fields: Record<string, string[]> }
}

/** The message a blank value gets: trim empties some, and those read "Required" as before. */
const expectRefusedAt = (body: Refusal, field: string, value: string) => {
  const messages = body.error.fields[field]
  expect(messages, JSON.stringify(body)).toBeDefined()
  if (value.trim() !== '') expect(messages).toContain(VISIBLE_MESSAGE)
  else expect(messages[0]).toMatch(/^Required/)
}

let t: TestApp
let admin: Agent
let developer: Agent
let analyst: Agent
beforeAll(async () => {
  t = await buildApp()
  admin = await signInAs(t.app, 'admin')
  developer = await signInAs(t.app, 'developer')
  analyst = await signInAs(t.app, 'analyst')
})
afterAll(() => t.close())

const count = async (table: string) => Number((await t.knex(table).count({ n: '*' }))[0].n)

describe('which characters show', () => {
  it.each(BLANK)('nothing shows in %s', (_label, value) => {
    expect(hasVisibleCharacter(value)).toBe(false)
  })
  it.each(VISIBLE)('something shows in a name with %s', (_label, value) => {
    expect(hasVisibleCharacter(value)).toBe(true)
  })
})

const recipe = (name: string) => ({
  name,
  instrument: 'violin',
  stringName: 'A',
  core: 'synthetic multifilament',
  vibratingLengthMm: 328,
})
const player = (name: string) => ({
  name,
  email: uniqueEmail('player'),
  instruments: ['viola'],
  level: 'amateur',
})
const staff = (name: string) => ({ email: uniqueEmail('staff'), name, role: 'analyst' })

let fixture: Awaited<ReturnType<typeof studyFixture>> | undefined
async function session(over: Record<string, unknown>) {
  fixture ??= await studyFixture(t.knex, 2, 1, 'Visible')
  return {
    name: 'Harewood damping',
    playerTitle: 'Evening listening',
    format: 'rating',
    recipeIds: fixture.recipeIds,
    clipSets: fixture.clipSets,
    deadline: isoDay(new Date(), 10),
    ...over,
  }
}
const attribute = (over: Record<string, string>) => ({
  attributes: [{ key: 'warmth', name: 'Warmth', low: 'thin', high: 'warm', ...over }],
})

interface Create {
  what: string
  table: string
  send: (value: string) => PromiseLike<{ status: number; body: Refusal }>
  field: string
}

const CREATES: Create[] = [
  {
    what: 'a recipe name',
    table: 'recipes',
    field: 'name',
    send: (v) => developer.post('/api/recipes').send(recipe(v)),
  },
  {
    what: 'an excerpt name',
    table: 'excerpts',
    field: 'name',
    send: (v) => developer.post('/api/excerpts').send({ name: v }),
  },
  {
    what: 'a session name',
    table: 'sessions',
    field: 'name',
    send: async (v) => developer.post('/api/sessions').send(await session({ name: v })),
  },
  {
    what: 'a player title',
    table: 'sessions',
    field: 'playerTitle',
    send: async (v) => developer.post('/api/sessions').send(await session({ playerTitle: v })),
  },
  {
    what: 'a time point label',
    table: 'sessions',
    field: 'timePointLabel',
    send: async (v) => developer.post('/api/sessions').send(await session({ timePointLabel: v })),
  },
  {
    what: 'an attribute name',
    table: 'sessions',
    field: 'attributes.name',
    send: async (v) => developer.post('/api/sessions').send(await session(attribute({ name: v }))),
  },
  {
    what: 'an attribute low end label',
    table: 'sessions',
    field: 'attributes.low',
    send: async (v) => developer.post('/api/sessions').send(await session(attribute({ low: v }))),
  },
  {
    what: 'an attribute high end label',
    table: 'sessions',
    field: 'attributes.high',
    send: async (v) => developer.post('/api/sessions').send(await session(attribute({ high: v }))),
  },
  {
    what: 'a player name in the panel',
    table: 'players',
    field: 'name',
    send: (v) => admin.post('/api/panel/players').send(player(v)),
  },
  {
    what: 'a staff name',
    table: 'users',
    field: 'name',
    send: (v) => admin.post('/api/staff').send(staff(v)),
  },
]

describe.each(CREATES)('$what', ({ table, field, send }) => {
  it.each(BLANK)('is refused when it is %s, at the field, storing nothing', async (_l, value) => {
    const before = await count(table)
    const res = await send(value)
    expect(res.status).toBe(422)
    expectRefusedAt(res.body, field, value)
    expect(await count(table)).toBe(before)
  })
})

describe('names that show are kept as typed', () => {
  it.each(VISIBLE)('a recipe name with %s', async (_label, value) => {
    const res = await developer.post('/api/recipes').send(recipe(value))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.recipe.name).toBe(value)
  })

  it('an excerpt, a session with its attribute, a player and a staff member', async () => {
    const excerpt = await developer.post('/api/excerpts').send({ name: 'Détaché 🎻 run' })
    const made = await developer.post('/api/sessions').send(
      await session({
        name: 'Ébène — 弦 ❤️',
        playerTitle: 'Soirée d’écoute 🎧',
        timePointLabel: 'Woche 2 ✓',
        ...attribute({ name: 'Wärme', low: 'dünn', high: 'warm ☀️' }),
      }),
    )
    const member = await admin.post('/api/panel/players').send(player('Zoë Brännvik-Nguyễn'))
    const colleague = await admin.post('/api/staff').send(staff('Ægir Þórsdóttir 👩‍🔬'))

    expect(excerpt.status, JSON.stringify(excerpt.body)).toBe(201)
    expect(excerpt.body.excerpt.name).toBe('Détaché 🎻 run')
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    expect(made.body.session).toMatchObject({
      name: 'Ébène — 弦 ❤️',
      playerTitle: 'Soirée d’écoute 🎧',
      timePointLabel: 'Woche 2 ✓',
    })
    expect(made.body.session.attributes[0]).toMatchObject({ name: 'Wärme', high: 'warm ☀️' })
    expect(member.status, JSON.stringify(member.body)).toBe(201)
    expect(member.body.player.name).toBe('Zoë Brännvik-Nguyễn')
    expect(colleague.status, JSON.stringify(colleague.body)).toBe(201)
    expect(await t.knex('users').where({ name: 'Ægir Þórsdóttir 👩‍🔬' }).first('id')).toBeTruthy()
  })
})

describe('changes and other typed names', () => {
  it('refuses a blank name in an edit and keeps the old one', async () => {
    const made = await admin.post('/api/panel/players').send(player('Ilse Marwood'))
    const id = made.body.player.id as number
    const recipeId = await addRecipe(t.knex, 'Kept')
    const keptName = (await t.knex('recipes').where({ id: recipeId }).first('name')).name

    const renamed = await saveEdit(admin, `/api/panel/players/${id}`, { name: '\u200b\u200b' })
    const recipeRenamed = await saveEdit(developer, `/api/recipes/${recipeId}`, { name: '\u2060' })

    expect(renamed.status).toBe(422)
    expect(renamed.body.error.fields.name).toEqual([VISIBLE_MESSAGE])
    expect(recipeRenamed.status).toBe(422)
    expect(recipeRenamed.body.error.fields.name).toEqual([VISIBLE_MESSAGE])
    expect((await t.knex('players').where({ id }).first('name')).name).toBe('Ilse Marwood')
    expect((await t.knex('recipes').where({ id: recipeId }).first('name')).name).toBe(keptName)
  })

  it('refuses blank performer and instrument codes of a clip', async () => {
    const clipId = await addClip(t.knex, await addRecipe(t.knex, 'Coded'))

    const performer = await saveEdit(developer, `/api/clips/${clipId}`, { performerCode: '\u200b' })
    const instrument = await saveEdit(developer, `/api/clips/${clipId}`, {
      instrumentCode: '\u202e',
    })

    expect(performer.status).toBe(422)
    expect(performer.body.error.fields.performerCode[0]).toBe(VISIBLE_MESSAGE)
    expect(instrument.status).toBe(422)
    expect(instrument.body.error.fields.instrumentCode[0]).toBe(VISIBLE_MESSAGE)
    const row = await t.knex('clips').where({ id: clipId }).first()
    expect([row.performer_code, row.instrument_code]).toEqual(['PF-T1', 'VN-T1'])
  })

  it('refuses a panel CSV row whose name shows nothing, with the same schema as the form', () => {
    const row = playerCsvRow.safeParse({
      name: '\u2060\u200b',
      email: uniqueEmail('csv'),
      instruments: 'violin; viola',
      level: 'student',
    })
    expect(row.success).toBe(false)
    expect(row.error && zodFields(row.error)).toEqual({ name: [VISIBLE_MESSAGE] })
  })

  it('refuses an exclusion reason of invisible characters, excluding no one', async () => {
    const made = await developer.post('/api/sessions').send(await session({}))
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    const before = await count('exclusions')

    const res = await analyst
      .post(`/api/findings/${made.body.session.id}/exclusions`)
      .send({ playerCode: 'P-0001', reason: '\u200b\u200b\u200b\u200b' })

    expect(res.status).toBe(422)
    expect(res.body.error.fields.reason).toEqual([VISIBLE_MESSAGE])
    expect(await count('exclusions')).toBe(before)
  })
})
