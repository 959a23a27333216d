import request from 'supertest'
import type { z } from 'zod'
import type { RingdownApp } from '../../../server/app'
import type { MountedTable } from '../../../server/app'
import type { RouteDef } from '../../../server/http/routeTable'
import { INVITATION_HEADER } from '../../../shared/constants'
import { answerFor } from '../playerFixtures'

// Walks everything a player can reach with one invitation link. The routes come from the app's
// own route tables: every route open without a staff role, in the order a player's pages call
// them, then any other such route (a new one is walked without anyone listing it here).

export interface Seen {
  what: string
  status: number
  headers: Record<string, unknown>
  text: string
  json: unknown
  /** Audio bytes, for audio responses. */
  bytes?: Buffer
}

export interface ServedAudio {
  trial: number
  screen: number
  code: number
  bytes: Buffer
}

export interface PlanTrial {
  index: number
  kind: 'rating' | 'pair' | 'triangle' | 'playtest'
  screen: number
  clips: { code: number; audioUrl: string }[]
  picture: unknown
  setCode: number | null
}

export interface Walked {
  seen: Seen[]
  audio: ServedAudio[]
  plan: { trials: PlanTrial[]; attributes: { key: string }[] } | null
  /** Routes walked, as "METHOD /path". */
  routes: Set<string>
}

export interface PlayerRoute {
  method: RouteDef['method']
  path: string
  def: RouteDef
}

/** Every route of the tables that needs no staff role: what a player (or anyone) can call. */
export function playerReachable(tables: MountedTable[]): PlayerRoute[] {
  return tables.flatMap((table) =>
    table.routes
      .filter((r) => r.roles === 'public')
      .map((r) => ({
        method: r.method,
        path: (table.prefix + (r.path === '/' ? '' : r.path)).replace(/\/$/, ''),
        def: r,
      })),
  )
}

// The order the player's pages go: later steps need the earlier ones.
const JOURNEY = [
  '/api/player/invitation',
  '/api/auth/link',
  '/api/player/state',
  '/api/player/consent',
  '/api/player/headphone/start',
  '/api/player/headphone',
  '/api/player/level',
  '/api/player/plan',
  '/api/player/audio/:ref',
  '/api/player/answers/:trialIndex',
]

const binary = (res: request.Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => done(null, Buffer.concat(chunks)))
}

/** Does an object schema (possibly wrapped in a default) have a `token` field? */
function hasToken(schema: z.ZodType | undefined): boolean {
  let s = schema as unknown as
    { shape?: Record<string, unknown>; def?: { innerType?: unknown } } | undefined
  for (let i = 0; i < 4 && s; i++) {
    if (s.shape && 'token' in s.shape) return true
    s = s.def?.innerType as typeof s
  }
  return false
}

export async function walk(
  app: RingdownApp,
  tables: MountedTable[],
  token: string,
  answerHeadphones: (start: unknown) => Record<string, unknown>,
): Promise<Walked> {
  const seen: Seen[] = []
  const audio: ServedAudio[] = []
  const routes = new Set<string>()
  let plan: Walked['plan'] = null
  let headphoneStart: unknown = null

  const keep = (what: string, res: request.Response) => {
    const bytes = Buffer.isBuffer(res.body) ? res.body : undefined
    seen.push({
      what,
      status: res.status,
      headers: res.headers,
      text: bytes ? bytes.toString('latin1') : (res.text ?? ''),
      json: bytes ? null : res.body,
      bytes,
    })
    return res
  }

  const reachable = playerReachable(tables)
  const ordered = [
    ...JOURNEY.flatMap((p) => reachable.filter((r) => r.path === p)),
    ...reachable.filter((r) => !JOURNEY.includes(r.path)),
  ]

  for (const r of ordered) {
    routes.add(`${r.method.toUpperCase()} ${r.path}`)
    const what = `${r.method.toUpperCase()} ${r.path}`
    const call = (path: string, body: Record<string, unknown> = {}) => {
      let req = request(app)[r.method](path)
      if (r.def.headers) req = req.set(INVITATION_HEADER, token)
      if (r.method === 'get' || r.method === 'delete') return req
      return req.send(hasToken(r.def.body) ? { token, ...body } : body)
    }

    if (r.path.endsWith('/audio/:ref')) {
      for (const trial of plan?.trials ?? [])
        for (const clip of trial.clips) {
          const res = keep(what, await request(app).get(clip.audioUrl).buffer(true).parse(binary))
          if (res.status === 200)
            audio.push({
              trial: trial.index,
              screen: trial.screen,
              code: clip.code,
              bytes: res.body,
            })
          keep(
            `${what} range`,
            await request(app)
              .get(clip.audioUrl)
              .set('Range', 'bytes=0-4095')
              .buffer(true)
              .parse(binary),
          )
        }
      keep(`${what} unknown`, await request(app).get('/api/player/audio/AAAAAAAAAAAAAAAAAAAAAAAA'))
      continue
    }
    if (r.path.endsWith('/answers/:trialIndex')) {
      const keys = (plan?.attributes ?? []).map((a) => a.key)
      for (const trial of plan?.trials ?? []) {
        const path = r.path.replace(':trialIndex', String(trial.index))
        const answer = answerFor(trial, keys)
        keep(what, await call(path, { answer }))
        keep(`${what} again`, await call(path, { answer }))
        // Answers meant for another trial: refused, and the refusals name nothing.
        keep(`${what} wrong`, await call(path, { answer: { kind: 'triangle', odd: 1 } }))
        const other = plan?.trials.find((o) => o.index !== trial.index && o.clips.length)
        if (other && trial.kind !== 'rating' && trial.kind !== 'playtest')
          keep(
            `${what} another trial's code`,
            await call(path, { answer: answerFor({ ...trial, clips: other.clips }, keys) }),
          )
      }
      keep(`${what} past the end`, await call(r.path.replace(':trialIndex', '999'), {}))
      continue
    }
    const path = r.path.replace(/:[A-Za-z]+/g, 'x')
    const body = r.path === '/api/player/headphone' ? answerHeadphones(headphoneStart) : {}
    const res = keep(what, await call(path, body))
    if (r.path === '/api/player/headphone/start') headphoneStart = res.body
    if (r.path === '/api/player/plan' && res.status === 200) plan = res.body.plan
  }
  keep(
    'GET /api/player/state at the end',
    await request(app).get('/api/player/state').set('X-Invitation-Token', token),
  )
  return { seen, audio, plan, routes }
}
