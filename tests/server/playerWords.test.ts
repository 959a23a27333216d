import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fixedClock } from '../../server/clock'
import { playerWordProblems, type RecipeWords } from '../../server/sessions/playerWords'
import { SESSIONS } from '../../seeds/demo/story'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { saveEdit } from './editing'
import { addAnswers, addClip, addPlayers, isoDay } from './sessionFixtures'

// The words players see may not name a recipe, its version label, or a construction word that
// tells the session's recipes apart. The cases are the brief's worked examples (DESIGN.md, "Player
// title and player message"; the issue's "Aurel-A" ~ "aurel a", "VISCOUS" ~ "viscous").

const build = (over: Partial<RecipeWords> & { name: string }): RecipeWords => ({
  version: 1,
  core: 'synthetic multifilament',
  windings: [{ material: 'aluminium', profile: 'flat' }],
  dampingKind: 'none',
  dampingGrade: '',
  dampingNotes: '',
  ...over,
})

const BARE = build({ name: 'Aurel A bare' })
const LIGHT = build({
  name: 'Aurel A light compound',
  dampingKind: 'compound',
  dampingGrade: 'V-20 (light)',
  dampingNotes: 'Thin bead of viscous compound under the first layer.',
})
const HEAVY = build({
  name: 'Aurel A heavy compound',
  version: 2,
  dampingKind: 'compound',
  dampingGrade: 'V-60 (heavy)',
  dampingNotes: 'Full coat of the stiffer compound.',
})
const AUREL = [BARE, LIGHT, HEAVY]

const title = (recipes: RecipeWords[], text: string) =>
  playerWordProblems(recipes, { playerTitle: text, playerMessage: '' }).playerTitle ?? []

describe('the player-words check', () => {
  it('finds a recipe name with case, punctuation and accents folded', () => {
    expect(title(AUREL, 'AUREL-a bare tonight')).toEqual([
      "Names recipe 'Aurel A bare': players would know what they hear",
    ])
    expect(title(AUREL, 'aurel_a  BARE')).toHaveLength(1)
    expect(title(AUREL, 'AurelA bare')).toHaveLength(1)
    // Compatibility decomposition (Unicode Standard Annex #15, NFKD) takes accents off letters.
    expect(title(AUREL, 'Aurél A bâre')).toHaveLength(1)
  })

  it('finds version labels written any way, and only of the session’s own versions', () => {
    for (const text of ['Round v2', 'Round V-2', 'round version 2'])
      expect(title(AUREL, text)[0], text).toMatch(/version label .* of recipe 'Aurel A heavy/)
    expect(title(AUREL, 'Round v3')).toEqual([])
  })

  it('refuses a construction word only some recipes have, in either field, at that field', () => {
    const problems = playerWordProblems(AUREL, {
      playerTitle: 'Evening listening',
      playerMessage: 'Listen for the VISCOUS feel.',
    })

    expect(problems).toEqual({
      playerMessage: [
        "Uses 'viscous', a construction word of 'Aurel A light compound' but not of every recipe here: players could tell the strings apart",
      ],
    })
    expect(title(AUREL, 'The heavy ones first')[0]).toMatch(/'heavy'.*'Aurel A heavy compound v2'/)
    expect(title(AUREL, 'Grade V 20')[0]).toMatch(/'V-20'/)
    expect(title(AUREL, 'Compounds compared')[0]).toMatch(/'compound'.*light.*heavy/)
  })

  it('lets through words every recipe shares, short and common words, numbers and longer words', () => {
    // Every recipe has a synthetic core under flat aluminium: saying so tells none apart.
    expect(title(AUREL, 'Synthetic core, flat aluminium winding')).toEqual([])
    expect(title(AUREL, 'The first of two rounds, 20 minutes, at home')).toEqual([])
    // Only whole words count: "coated" is not the heavy compound's "coat", "Aurel" alone is shared.
    expect(title(AUREL, 'Coated in rosin: Aurel listening')).toEqual([])
    const compounds = [LIGHT, HEAVY]
    expect(title(compounds, 'Compound strings')).toEqual([])
    expect(title(compounds, 'Light and shade')).toHaveLength(1)
  })

  it('tells a word of a recipe name apart from one of the construction', () => {
    const round = build({
      name: 'Tessel D round',
      core: 'stranded steel',
      windings: [
        { material: 'chrome steel', profile: 'round' },
        { material: 'chrome steel', profile: 'round' },
      ],
    })
    const flat = build({
      name: 'Tessel D flat',
      core: 'stranded steel',
      windings: [
        { material: 'chrome steel', profile: 'round' },
        { material: 'chrome steel', profile: 'flat' },
      ],
    })
    const wrap = build({ name: 'Fennick wrap', core: 'stranded steel' })

    // Both cellos' windings have a round layer: "round" tells nothing; "flat" does.
    expect(title([round, flat], 'Second round')).toEqual([])
    expect(title([round, flat], 'Flat out')[0]).toMatch(/'flat', a construction word/)
    expect(title([round, wrap], 'Listen to the wrap')[0]).toMatch(/'wrap', a word of the name/)
    expect(playerWordProblems([round, flat], { playerTitle: '', playerMessage: '' })).toEqual({})
  })

  it('passes every demo session’s player words, which differ from its staff name', () => {
    expect(SESSIONS.length).toBeGreaterThan(5)
    for (const s of SESSIONS) {
      expect(s.playerTitle).not.toBe(s.name)
      expect(title(AUREL, s.playerTitle), s.playerTitle).toEqual([])
      expect(title(AUREL, s.playerMessage), s.playerMessage).toEqual([])
    }
  })
})

describe('sessions refuse telling player words', () => {
  const clock = fixedClock(new Date('2026-12-01T09:00:00Z'))
  let t: TestApp
  let developer: Agent
  let n = 0
  beforeAll(async () => {
    t = await buildApp({ clock })
    developer = await signInAs(t.app, 'developer')
  })
  afterAll(() => t.close())

  /** Two violin A recipes told apart by damping, with one matched set of clips. */
  async function recipes() {
    const tag = ++n
    const make = async (name: string, extra: Record<string, unknown>) => {
      const res = await developer.post('/api/recipes').send({
        name: `${name} ${tag}`,
        instrument: 'violin',
        stringName: 'A',
        core: 'synthetic multifilament',
        windings: [{ material: 'aluminium', profile: 'flat', wireMm: 0.08 }],
        vibratingLengthMm: 328,
        ...extra,
      })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      return res.body.recipe as { id: number; name: string }
    }
    const bare = await make('Quillon bare', {})
    const damped = await make('Quillon damped', {
      dampingKind: 'compound',
      dampingNotes: 'Viscous bead under the winding.',
    })
    const performer = `PF-W${tag}`
    const clipIds = [await addClip(t.knex, bare.id, { performer })]
    clipIds.push(await addClip(t.knex, damped.id, { performer }))
    return { bare, damped, recipeIds: [bare.id, damped.id], clipSets: [{ key: 'scale', clipIds }] }
  }

  const body = (r: Awaited<ReturnType<typeof recipes>>, over: Record<string, unknown> = {}) => ({
    name: `${r.bare.name} against ${r.damped.name}`,
    playerTitle: 'Evening listening',
    playerMessage: 'Use closed headphones.',
    format: 'pair',
    recipeIds: r.recipeIds,
    clipSets: r.clipSets,
    deadline: isoDay(clock.now(), 10),
    ...over,
  })
  const sessionCount = async () => Number((await t.knex('sessions').count({ n: '*' }))[0].n)

  it('allows recipe names in the staff name, and stores the player words apart', async () => {
    const r = await recipes()

    const res = await developer.post('/api/sessions').send(body(r))

    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.session).toMatchObject({
      name: `${r.bare.name} against ${r.damped.name}`,
      playerTitle: 'Evening listening',
      playerMessage: 'Use closed headphones.',
      warnings: [],
    })
    const row = await t.knex('sessions').where({ id: res.body.session.id }).first()
    expect(row).toMatchObject({
      player_title: 'Evening listening',
      player_message: 'Use closed headphones.',
    })
  })

  it('refuses a new session whose words name a recipe or its damping, at the field, storing nothing', async () => {
    const r = await recipes()
    const before = await sessionCount()

    const named = await developer
      .post('/api/sessions')
      .send(body(r, { playerTitle: r.bare.name.toUpperCase().replace(/ /g, '-') }))
    const damped = await developer
      .post('/api/sessions')
      .send(body(r, { playerMessage: 'Notice how viscous the second one feels.' }))
    const missing = await developer.post('/api/sessions').send(body(r, { playerTitle: '  ' }))
    const long = await developer
      .post('/api/sessions')
      .send(body(r, { playerTitle: 'x'.repeat(81) }))

    expect(named.status).toBe(422)
    expect(named.body.error.fields).toEqual({
      playerTitle: [`Names recipe '${r.bare.name}': players would know what they hear`],
    })
    expect(damped.status).toBe(422)
    expect(damped.body.error.fields.playerMessage[0]).toMatch(
      new RegExp(`^Uses 'Viscous', a construction word of '${r.damped.name}'`),
    )
    expect(missing.body.error.fields.playerTitle).toEqual(['Required: the title players see'])
    expect(long.body.error.fields.playerTitle).toEqual(['At most 80 characters'])
    expect(await sessionCount()).toBe(before)
  })

  it('checks an update of the player words alone, and an update of the recipes', async () => {
    const r = await recipes()
    const id = (await developer.post('/api/sessions').send(body(r))).body.session.id
    const other = await developer.post('/api/recipes').send({
      name: `Brisk ${n}`,
      instrument: 'violin',
      stringName: 'A',
      core: 'synthetic multifilament',
      vibratingLengthMm: 328,
    })
    const otherClip = await addClip(t.knex, other.body.recipe.id, { performer: `PF-W${n}` })

    const words = await saveEdit(developer, `/api/sessions/${id}`, {
      playerMessage: `Compare ${r.damped.name} with the other.`,
    })
    // Neutral for these two recipes; a third one named Brisk makes it telling.
    const retitled = await saveEdit(developer, `/api/sessions/${id}`, {
      playerTitle: 'Brisk evening',
    })
    const added = await saveEdit(developer, `/api/sessions/${id}`, {
      recipeIds: [...r.recipeIds, other.body.recipe.id],
      clipSets: [{ key: 'scale', clipIds: [...r.clipSets[0].clipIds, otherClip] }],
    })

    expect(words.status).toBe(422)
    expect(words.body.error.fields).toEqual({
      playerMessage: [`Names recipe '${r.damped.name}': players would know what they hear`],
    })
    expect(retitled.status).toBe(200)
    expect(added.status).toBe(422)
    expect(added.body.error.fields).toEqual({
      playerTitle: [
        `Uses 'Brisk', a word of the name of '${other.body.recipe.name}' but not of every recipe here: players could tell the strings apart`,
      ],
    })
    const row = await t.knex('sessions').where({ id }).first()
    expect(row).toMatchObject({
      player_title: 'Brisk evening',
      player_message: 'Use closed headphones.',
      recipe_ids: JSON.stringify(r.recipeIds),
    })
  })

  it('re-checks on opening: a recipe renamed since refuses the open at the field', async () => {
    const r = await recipes()
    const id = (
      await developer.post('/api/sessions').send(body(r, { playerTitle: 'Evening with Tamsin' }))
    ).body.session.id
    const renamed = await saveEdit(developer, `/api/recipes/${r.bare.id}`, { name: 'Tamsin' })

    const open = await developer.post(`/api/sessions/${id}/open`).send({})
    const detail = await developer.get(`/api/sessions/${id}`)

    expect(renamed.status).toBe(200)
    expect(open.status).toBe(422)
    expect(open.body.error.fields.playerTitle).toEqual([
      "Names recipe 'Tamsin': players would know what they hear",
    ])
    expect(detail.body.session.status).toBe('draft')
    expect(detail.body.session.warnings).toContain(
      "Names recipe 'Tamsin': players would know what they hear",
    )
  })

  it('keeps checking the player words once the design is locked by answers', async () => {
    const r = await recipes()
    const id = (await developer.post('/api/sessions').send(body(r))).body.session.id
    await developer.post(`/api/sessions/${id}/open`).send({})
    await developer
      .post(`/api/sessions/${id}/invitations`)
      .send({ playerIds: await addPlayers(t.knex, 1) })
    const inv = await t.knex('invitations').where({ session_id: id }).first('id')
    await addAnswers(t.knex, inv.id, [0], clock.now().toISOString())

    const telling = await saveEdit(developer, `/api/sessions/${id}`, {
      playerMessage: 'One of them has a viscous bead.',
    })
    const neutral = await saveEdit(developer, `/api/sessions/${id}`, {
      playerMessage: 'Take a break halfway.',
    })

    expect(telling.status).toBe(422)
    expect(Object.keys(telling.body.error.fields)).toEqual(['playerMessage'])
    expect(neutral.status).toBe(200)
    expect(neutral.body.session).toMatchObject({
      locked: true,
      playerMessage: 'Take a break halfway.',
    })
  })
})
