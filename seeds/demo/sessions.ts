import type { Knex } from 'knex'
import type { AppContext } from '../../server/context'
import type { Clock } from '../../server/clock'
import type { Outbox } from '../../server/mail/outbox'
import type { Actor } from '../../server/audit/service'
import { DEMO_STAFF } from '../../server/auth/demoAccounts'
import { signInvitation } from '../../server/auth/invitationTokens'
import { createSession } from '../../server/sessions/design'
import { closeSession, openSession } from '../../server/sessions/lifecycle'
import { invitePlayers } from '../../server/invitations/invite'
import { loadSession } from '../../server/sessions/rows'
import { servedTrials } from '../../server/sessions/servedRecord'
import { playerLanding } from '../../server/player/landing'
import { confirmLevel, giveConsent } from '../../server/player/progress'
import { recordHeadphoneCheck, startHeadphoneCheck } from '../../server/player/headphone'
import { hasHeadphoneCheck } from '../../server/player/headphoneRecord'
import { HEADPHONE_RETRY } from '../../shared/headphoneCheck'
import { saveAnswer } from '../../server/player/saveAnswer'
import { sessionDesignBody } from '../../shared/schemas/sessions'
import { trialAnswer } from '../../shared/schemas/rating'
import { demoAnswer } from './answers'
import { SESSIONS, type DemoSession } from './story'

/*
 * Plays the demo story through the same services people's actions call: a developer designs,
 * opens and closes each session, invites its players, and each player opens the link, gives
 * consent, takes the headphone check and sets the level where the session is listened to, and
 * answers trial by trial. A clock of the demo's own sets each step on its day, so a closed
 * session's answers lie in the past and its findings read as they would have then.
 */

const DAY = 86_400_000
const HOUR = 3_600_000
const MINUTE = 60_000

/** A clock the story moves step by step. */
function storyClock(start: Date): Clock & { set(at: Date): void } {
  let now = start
  return { now: () => now, set: (at) => (now = at) }
}

/**
 * Invitations to sessions that have closed went out back then, so they are stored as sent;
 * open sessions' mails wait in the outbox for the server to deliver when it starts.
 */
function storyOutbox(knex: Knex, outbox: Outbox, clock: Clock, sent: () => boolean): Outbox {
  return {
    ...outbox,
    async enqueue(mail, trx) {
      const id = await outbox.enqueue(mail, trx)
      const at = clock.now().toISOString()
      await (trx ?? knex)('outbox')
        .where({ id })
        .update(sent() ? { created_at: at, status: 'sent', sent_at: at } : { created_at: at })
      return id
    },
    deliverDue: async () => {},
  }
}

async function recipeId(knex: Knex, name: string): Promise<number | null> {
  const row: { id: number } | undefined = await knex('recipes')
    .where({ name })
    .orderBy('version', 'desc')
    .first('id')
  return row?.id ?? null
}

async function clipSet(
  knex: Knex,
  recipeIds: number[],
  [excerpt, performer, instrument]: string[],
) {
  const rows: { id: number; recipe_id: number }[] = await knex('clips as c')
    .join('excerpts as e', 'e.id', 'c.excerpt_id')
    .where({ 'e.name': excerpt, 'c.performer_code': performer, 'c.instrument_code': instrument })
    .whereIn('c.recipe_id', recipeIds)
    .orderBy('c.id')
    .select('c.id', 'c.recipe_id')
  const clipIds = recipeIds.map((r) => rows.find((c) => c.recipe_id === r)?.id)
  if (clipIds.some((id) => id === undefined)) return null
  // Each recipe's second take, where one was recorded, serves its twins and hidden repeats.
  const twinClipIds = recipeIds.flatMap((r) => {
    const takes = rows.filter((c) => c.recipe_id === r)
    return takes.length > 1 ? [takes[1].id] : []
  })
  return {
    key: `${excerpt} · ${performer} · ${instrument}`,
    clipIds: clipIds as number[],
    twinClipIds,
  }
}

type StoryContext = AppContext & { clock: ReturnType<typeof storyClock> }

const later = (ctx: StoryContext, ms: number) =>
  ctx.clock.set(new Date(ctx.clock.now().getTime() + ms))

/**
 * The headphone check as the player's page takes it: the server deals each attempt and scores
 * the picks. The first `failures` attempts miss half the sets of tones; after a failure the
 * player waits out the pause and tries again, until the attempts allowed are used up.
 */
async function takeHeadphoneCheck(ctx: StoryContext, token: string, failures: number) {
  for (let attempt = 1; attempt <= HEADPHONE_RETRY.attempts; attempt++) {
    const deal = await startHeadphoneCheck(ctx, token)
    const miss = attempt <= failures ? deal.trials.length / 2 : 0
    const responses = deal.trials.map(({ tones }, i) => {
      const right = tones.indexOf('quiet')
      return i < miss ? (right + 1) % 3 : right
    })
    later(ctx, 2 * MINUTE)
    const state = await recordHeadphoneCheck(ctx, token, { attempt: deal.attempt, responses })
    if (state.headphone?.status !== 'retry') return
    later(ctx, HEADPHONE_RETRY.pauseSeconds * 1000)
  }
}

/** Each player opens their link, consents, takes the checks before listening, and answers as far as the story says. */
async function playersAnswer(
  ctx: StoryContext,
  sessionId: number,
  demo: DemoSession,
  recipeIds: number[],
  invitedAt: Date,
) {
  const session = await loadSession(ctx.knex, sessionId)
  const recipeRank = new Map(recipeIds.map((id, i) => [id, i]))
  const invitations: { id: number; player_index: number; token_id: string }[] = await ctx
    .knex('invitations')
    .where({ session_id: sessionId })
    .orderBy('player_index')
    .select('id', 'player_index', 'token_id')
  for (const inv of invitations) {
    const index = inv.player_index
    if (index >= demo.progress.length) continue
    const at = (k: number) => new Date(invitedAt.getTime() + (k + 1) * HOUR)
    const claims = { jti: inv.token_id, sub: inv.id }
    const token = signInvitation(ctx.config.jwtSecret, ctx.clock, claims, session.deadline)
    ctx.clock.set(at(0))
    await playerLanding(ctx, token)
    const trials = await servedTrials(ctx.knex, session, inv.id)
    const given = demo.progress[index] ?? 0
    const count = given === 'all' ? trials.length : given
    if (count === 0) continue
    await giveConsent(ctx, token)
    if (hasHeadphoneCheck(session.format)) {
      later(ctx, MINUTE)
      await takeHeadphoneCheck(ctx, token, demo.headphoneFailures?.[index] ?? 0)
      later(ctx, MINUTE)
      await confirmLevel(ctx, token)
    }
    for (const [k, trial] of trials.slice(0, count).entries()) {
      ctx.clock.set(at(k + 1))
      const answer = demoAnswer(trial, { recipeRank, playerIndex: index, trialIndex: k, demo })
      await saveAnswer(ctx, token, k, trialAnswer.parse(answer))
    }
  }
}

export async function seedDemoSessions(appCtx: AppContext): Promise<number> {
  const { knex } = appCtx
  if (await knex('sessions').first('id')) return 0
  const today = appCtx.clock.now()
  const day = (d: number) => new Date(today.getTime() + d * DAY)
  const clock = storyClock(today)
  let historic = false
  const ctx = {
    ...appCtx,
    clock,
    outbox: storyOutbox(knex, appCtx.outbox, clock, () => historic),
  }
  const developer: { id: number; email: string; name: string } | undefined = await knex('users')
    .where({ email: DEMO_STAFF[1].email })
    .first('id', 'email', 'name')
  const actor: Actor = { userId: developer?.id ?? null, email: developer?.email ?? null }
  const created = new Map<string, number>()
  let count = 0
  for (const demo of SESSIONS) {
    const recipeIds = (await Promise.all(demo.recipes.map((r) => recipeId(knex, r)))).filter(
      (id): id is number => id !== null,
    )
    if (recipeIds.length !== demo.recipes.length) continue
    const sets = await Promise.all(demo.sets.map((s) => clipSet(knex, recipeIds, s)))
    if (sets.some((s) => s === null)) continue
    const openedDay = Math.min(demo.deadlineDays - 14, -1)
    historic = demo.status === 'closed'

    clock.set(day(openedDay - 2))
    const design = sessionDesignBody.parse({
      name: demo.name,
      purpose: demo.purpose,
      format: demo.format,
      recipeIds,
      clipSets: sets,
      duplicates: demo.duplicates,
      playerTitle: demo.playerTitle,
      playerMessage: demo.playerMessage,
      deadline: day(demo.deadlineDays).toISOString().slice(0, 10),
      timePointLabel: demo.label ?? null,
    })
    const parentSessionId = demo.parent ? created.get(demo.parent) : undefined
    const { id } = await createSession(ctx, design, actor, { parentSessionId })
    if (demo.label) created.set(demo.label, id)
    count++
    if (demo.status === 'draft') continue

    clock.set(day(openedDay))
    await openSession(ctx, id, actor)
    const players = (
      (await knex('players')
        .whereIn(
          'email',
          demo.players.map((local) => `${local}@players.larchmere.test`),
        )
        .where({ status: 'active' })
        .select('id', 'email')) as { id: number; email: string }[]
    ).sort(
      (a, b) =>
        demo.players.indexOf(a.email.split('@')[0]) - demo.players.indexOf(b.email.split('@')[0]),
    )
    if (players.length)
      await invitePlayers(
        ctx,
        id,
        players.map((p) => p.id),
        actor,
      )
    await playersAnswer(ctx, id, demo, recipeIds, day(openedDay))
    if (demo.status === 'closed') {
      clock.set(day(demo.deadlineDays + 1))
      await closeSession(ctx, id, actor)
    }
  }
  return count
}
