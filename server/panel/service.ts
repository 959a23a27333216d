import { randomInt } from 'node:crypto'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { whereContains } from '../db/like'
import { assertRevision, nextRevision, updateAtRevision } from '../lib/revision'
import type {
  CreatePlayerBody,
  ListPlayersQuery,
  PanelSummary,
  Player,
  UpdatePlayerBody,
} from '../../shared/schemas/panel'
import { INSTRUMENTS, PLAYER_LEVELS } from '../../shared/constants'

export interface PlayerRow {
  id: number
  code: string
  name: string | null
  email: string | null
  instruments: string
  level: Player['level']
  region: string
  consent_date: string | null
  notes: string
  status: Player['status']
  revision: number
  created_at: string
  updated_at: string
  deleted_at: string | null
}

export const toPlayer = (r: PlayerRow): Player => ({
  id: r.id,
  code: r.code,
  name: r.name,
  email: r.email,
  instruments: JSON.parse(r.instruments) as string[],
  level: r.level,
  region: r.region,
  consentDate: r.consent_date,
  notes: r.notes,
  status: r.status,
  revision: r.revision,
  createdAt: r.created_at,
  updatedAt: r.updated_at,
})

// Letters and digits that cannot be misread for one another on a printed sheet.
const CODE_ALPHABET = 'ACDEFHJKLMNPRTUVWXY34679'

export async function newPlayerCode(db: Knex): Promise<string> {
  for (;;) {
    let code = 'P-'
    for (let i = 0; i < 5; i++) code += CODE_ALPHABET[randomInt(CODE_ALPHABET.length)]
    if (!(await db('players').where({ code }).first())) return code
  }
}

const SORT_COLUMNS = {
  name: 'name',
  level: 'level',
  region: 'region',
  consentDate: 'consent_date',
  createdAt: 'created_at',
  code: 'code',
} as const

export async function listPlayers(knex: Knex, query: ListPlayersQuery): Promise<Player[]> {
  const q = knex<PlayerRow>('players')
  if (query.status !== 'all') q.where({ status: query.status })
  if (query.level) q.where({ level: query.level })
  // Instruments are a JSON array of known words, so a quoted match is exact.
  if (query.instrument) q.where('instruments', 'like', `%"${query.instrument}"%`)
  if (query.q) {
    const text = query.q
    q.where((w) => {
      for (const [i, column] of ['name', 'email', 'region', 'code'].entries())
        whereContains(w, column, text, i > 0)
    })
  }
  const rows: PlayerRow[] = await q
    .orderByRaw(`${SORT_COLUMNS[query.sort]} IS NULL`)
    .orderBy(SORT_COLUMNS[query.sort], query.order)
    .orderBy('id')
  return rows.map(toPlayer)
}

export async function panelSummary(knex: Knex): Promise<PanelSummary> {
  const rows: Pick<PlayerRow, 'instruments' | 'level' | 'status'>[] = await knex('players').select(
    'instruments',
    'level',
    'status',
  )
  const byInstrument = Object.fromEntries(INSTRUMENTS.map((i) => [i, 0]))
  const byLevel = Object.fromEntries(PLAYER_LEVELS.map((l) => [l, 0]))
  const byStatus: Record<string, number> = { active: 0, inactive: 0, deleted: 0 }
  for (const r of rows) {
    byStatus[r.status] = (byStatus[r.status] ?? 0) + 1
    if (r.status !== 'active') continue
    for (const i of JSON.parse(r.instruments) as string[])
      byInstrument[i] = (byInstrument[i] ?? 0) + 1
    byLevel[r.level] = (byLevel[r.level] ?? 0) + 1
  }
  return { total: byStatus.active, byInstrument, byLevel, byStatus }
}

async function assertEmailFree(db: Knex, email: string, exceptId?: number) {
  const q = db('players').where({ email })
  if (exceptId) q.whereNot({ id: exceptId })
  if (await q.first())
    throw conflict('A player with this e-mail is already on the panel', {
      email: ['Already on the panel'],
    })
}

type NewPlayer = Required<Omit<CreatePlayerBody, 'consentDate'>> & { consentDate: string | null }

export async function insertPlayer(db: Knex, now: string, body: NewPlayer): Promise<number> {
  const [id] = await db('players').insert({
    code: await newPlayerCode(db),
    name: body.name,
    email: body.email,
    instruments: JSON.stringify(body.instruments),
    level: body.level,
    region: body.region,
    consent_date: body.consentDate,
    notes: body.notes,
    status: 'active',
    created_at: now,
    updated_at: now,
  })
  return id as number
}

export async function createPlayer(
  ctx: AppContext,
  body: NewPlayer,
  actor: Actor,
): Promise<Player> {
  return ctx.knex.transaction(async (trx) => {
    await assertEmailFree(trx, body.email)
    const id = await insertPlayer(trx, ctx.clock.now().toISOString(), body)
    const row: PlayerRow = await trx('players').where({ id }).first()
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'panel.player_added',
      targetType: 'player',
      targetId: row.code,
      details: { level: row.level, instruments: body.instruments },
    })
    return toPlayer(row)
  })
}

export async function updatePlayer(
  ctx: AppContext,
  id: number,
  body: UpdatePlayerBody,
  actor: Actor,
): Promise<Player> {
  return ctx.knex.transaction(async (trx) => {
    const row: PlayerRow | undefined = await trx('players').where({ id }).first()
    if (!row || row.status === 'deleted') throw notFound('Player')
    assertRevision('players', row, body.revision)
    if (body.email && body.email !== row.email) await assertEmailFree(trx, body.email, id)
    const changes: Record<string, unknown> = {}
    if (body.name !== undefined) changes.name = body.name
    if (body.email !== undefined) changes.email = body.email
    if (body.instruments !== undefined) changes.instruments = JSON.stringify(body.instruments)
    if (body.level !== undefined) changes.level = body.level
    if (body.region !== undefined) changes.region = body.region
    if (body.consentDate !== undefined) changes.consent_date = body.consentDate
    if (body.notes !== undefined) changes.notes = body.notes
    if (body.status !== undefined) changes.status = body.status
    const changed = Object.keys(changes).filter(
      (k) => changes[k] !== (row as unknown as Record<string, unknown>)[k],
    )
    if (changed.length === 0) return toPlayer(row)
    await updateAtRevision(trx, 'players', id, body.revision, {
      ...changes,
      updated_at: ctx.clock.now().toISOString(),
    })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action:
        body.status === 'inactive' && row.status === 'active'
          ? 'panel.player_deactivated'
          : 'panel.player_updated',
      targetType: 'player',
      targetId: row.code,
      // Field names only: personal data stays out of the audit log.
      details: { fields: changed },
    })
    return toPlayer(await trx('players').where({ id }).first())
  })
}

/**
 * Deletion on the player's request: personal data goes, the pseudonymous code stays so that
 * ratings already given remain usable in findings without pointing at a person.
 */
export async function erasePlayer(ctx: AppContext, id: number, actor: Actor): Promise<Player> {
  return ctx.knex.transaction(async (trx) => {
    const row: PlayerRow | undefined = await trx('players').where({ id }).first()
    if (!row || row.status === 'deleted') throw notFound('Player')
    const now = ctx.clock.now().toISOString()
    await trx('players')
      .where({ id })
      .update({
        name: null,
        email: null,
        region: '',
        notes: '',
        consent_date: null,
        status: 'deleted',
        deleted_at: now,
        updated_at: now,
        ...nextRevision(trx),
      })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'panel.player_erased',
      targetType: 'player',
      targetId: row.code,
      details: { reason: 'deleted on request; ratings kept under the code' },
    })
    return toPlayer(await trx('players').where({ id }).first())
  })
}

export async function getPlayer(knex: Knex, id: number): Promise<Player> {
  const row: PlayerRow | undefined = await knex('players').where({ id }).first()
  if (!row) throw notFound('Player')
  return toPlayer(row)
}
