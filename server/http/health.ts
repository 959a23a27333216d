/*
 * Liveness and readiness. `GET /api/health` only says the process answers (`{ status: 'ok' }`,
 * a shape other tools rely on). Readiness looks at what a save needs: the database (a real read
 * and a tiny committed write), the media folders (writable, enough free space), the outbox and
 * the worker pool. Anyone may ask whether each part is ok (load balancers ask without signing
 * in); the figures and the mail server's last words, which can name hosts, are for admins.
 */
import { randomBytes } from 'node:crypto'
import { mkdir, rm, statfs, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { performance } from 'node:perf_hooks'
import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import { syncTransaction } from '../db/syncTransaction'
import { mediaFolders } from '../clips/storage'
import { route, type RouteDef } from './routeTable'
import { unavailability, type Unavailability } from './errorHandler'

/** failing: saves cannot succeed (not ready); degraded: they can, but something lags. */
export type PartStatus = 'ok' | 'degraded' | 'failing'

interface Part {
  status: PartStatus
  /** In plain words, without paths or hosts. */
  problem?: string
}

export interface Readiness {
  ready: boolean
  parts: {
    database: Part & { probeMs?: number }
    media: Part & { freeBytes?: number; minFreeBytes: number }
    mail: Part & {
      /** Mails per outbox status, whatever statuses the outbox uses. */
      byStatus: Record<string, number>
      /** Mails not yet sent and not given up on. */
      waiting: number
      oldestWaitingSeconds: number | null
      lastError: string | null
    }
    workers: Part & { threads: number; busy: number; waiting: number; done: number; failed: number }
  }
}

export type PublicReadiness = {
  status: 'ready' | 'not_ready'
  parts: Record<keyof Readiness['parts'], PartStatus>
}

export interface HealthOptions {
  /** Readiness is worked out at most this often; it writes, and anyone may ask. */
  cacheMs?: number
  /** Free space the media folder needs; defaults to room for two of the largest recordings. */
  minFreeBytes?: number
}

/** Statuses after which the outbox does nothing more with a mail; any other one is waiting. */
const DONE = ['sent', 'failed']
/** A mail waiting longer than this means the mail server has been unreachable for a while. */
const MAIL_LATE_MS = 15 * 60_000
/** The probe gives another writer this long before it calls the database busy. */
const PROBE_BUSY_MS = 250

const PROBLEM: Record<Unavailability, string> = {
  full: 'the disk is full',
  read_only: 'storage cannot be written',
  busy: 'the database is locked by another writer',
}

function failed(err: unknown, otherwise: string): Part {
  const kind = unavailability(err)
  return { status: 'failing', problem: kind ? PROBLEM[kind] : otherwise }
}

async function checkDatabase(ctx: AppContext): Promise<Readiness['parts']['database']> {
  const start = performance.now()
  try {
    // Setting the lock row to itself changes nothing but is a real write: it takes the write
    // lock, fills a page of the log and commits, as a save does.
    await syncTransaction(
      ctx.knex,
      (db) => {
        db.get('select count(*) as n from knex_migrations')
        db.run('update knex_migrations_lock set is_locked = is_locked')
      },
      { busyTimeoutMs: PROBE_BUSY_MS },
    )
    return { status: 'ok', probeMs: Math.round(performance.now() - start) }
  } catch (err) {
    ctx.logger.warn({ err }, 'readiness: database probe failed')
    return failed(err, 'the database cannot be read or written')
  }
}

async function checkMedia(
  ctx: AppContext,
  minFreeBytes: number,
): Promise<Readiness['parts']['media']> {
  const folders = mediaFolders(ctx.config.mediaDir)
  try {
    for (const folder of [folders.incoming, folders.originals, folders.renditions]) {
      await mkdir(folder, { recursive: true })
      const probe = join(folder, `.ready-${randomBytes(6).toString('hex')}`)
      await writeFile(probe, 'ok')
      await rm(probe, { force: true })
    }
    const fs = await statfs(folders.originals)
    const freeBytes = fs.bavail * fs.bsize
    if (freeBytes < minFreeBytes)
      return { status: 'failing', problem: 'the disk is nearly full', freeBytes, minFreeBytes }
    return { status: 'ok', freeBytes, minFreeBytes }
  } catch (err) {
    ctx.logger.warn({ err }, 'readiness: media probe failed')
    return { ...failed(err, 'the media folders cannot be written'), minFreeBytes }
  }
}

async function checkMail(ctx: AppContext): Promise<Readiness['parts']['mail']> {
  const empty = { byStatus: {}, waiting: 0, oldestWaitingSeconds: null, lastError: null }
  try {
    const rows: { status: string; n: number; oldest: string | null }[] = await ctx
      .knex('outbox')
      .select('status')
      .count({ n: '*' })
      .min({ oldest: 'created_at' })
      .groupBy('status')
    const waitingRows = rows.filter((r) => !DONE.includes(r.status))
    const oldest = waitingRows
      .map((r) => r.oldest)
      .filter((v): v is string => Boolean(v))
      .sort()[0]
    const last: { last_error: string } | undefined = await ctx
      .knex('outbox')
      .whereNotIn('status', DONE)
      .whereNotNull('last_error')
      .orderBy('id', 'desc')
      .first('last_error')
    const ageMs = oldest ? ctx.clock.now().getTime() - Date.parse(oldest) : null
    const late = ageMs !== null && ageMs > Math.max(MAIL_LATE_MS, 2 * ctx.config.mail.pollMs)
    return {
      // The outbox keeps every mail until it goes: a mail server that is down delays mail but
      // must not take the server out of service, so mail is at worst degraded.
      status: late ? 'degraded' : 'ok',
      ...(late ? { problem: 'mail has been waiting for the mail server' } : {}),
      byStatus: Object.fromEntries(rows.map((r) => [r.status, Number(r.n)])),
      waiting: waitingRows.reduce((sum, r) => sum + Number(r.n), 0),
      oldestWaitingSeconds: ageMs === null ? null : Math.max(0, Math.round(ageMs / 1000)),
      lastError: last?.last_error ?? null,
    }
  } catch (err) {
    return { ...failed(err, 'the outbox cannot be read'), ...empty }
  }
}

function checkWorkers(ctx: AppContext): Readiness['parts']['workers'] {
  try {
    const { starting, ...load } = ctx.pool.load()
    if (starting) return { status: 'failing', problem: 'the worker threads are starting', ...load }
    // A queue this long means findings and clip analysis wait seconds for a thread.
    const behind = load.waiting > Math.max(4, 2 * load.threads)
    return {
      status: behind ? 'degraded' : 'ok',
      ...(behind ? { problem: 'heavy work is queueing for a thread' } : {}),
      ...load,
    }
  } catch {
    return { status: 'failing', problem: 'the worker threads do not answer', ...NO_LOAD }
  }
}
const NO_LOAD = { threads: 0, busy: 0, waiting: 0, done: 0, failed: 0 }

export interface Health {
  live(): { status: 'ok' }
  ready(): Promise<Readiness>
}

export function createHealth(ctx: AppContext, options: HealthOptions = {}): Health {
  const cacheMs = options.cacheMs ?? 2000
  const minFreeBytes = options.minFreeBytes ?? 2 * ctx.config.uploadMaxMb * 1024 * 1024
  // Monotonic time, not the app clock: the cache is about load, and test clocks stand still.
  let cached: { at: number; value: Promise<Readiness> } | null = null

  async function work(): Promise<Readiness> {
    const [database, media, mail] = await Promise.all([
      checkDatabase(ctx),
      checkMedia(ctx, minFreeBytes),
      checkMail(ctx),
    ])
    const parts = { database, media, mail, workers: checkWorkers(ctx) }
    return { ready: Object.values(parts).every((p) => p.status !== 'failing'), parts }
  }

  return {
    live: () => ({ status: 'ok' }),
    ready() {
      const now = performance.now()
      // Callers that arrive while a check runs share it.
      if (!cached || now - cached.at >= cacheMs) cached = { at: now, value: work() }
      return cached.value
    },
  }
}

/** What anyone may see: ready or not, and each part's status word. */
export function publicReadiness(r: Readiness): PublicReadiness {
  const parts = Object.fromEntries(
    Object.entries(r.parts).map(([name, part]) => [name, part.status]),
  ) as PublicReadiness['parts']
  return { status: r.ready ? 'ready' : 'not_ready', parts }
}

export function healthRoutes(health: Health): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/health',
      roles: 'public',
      handler: (_req, res) => {
        res.json(health.live())
      },
    }),
    route({
      method: 'get',
      path: '/health/ready',
      roles: 'public',
      handler: async (_req, res) => {
        const r = await health.ready()
        res.status(r.ready ? 200 : 503).json(publicReadiness(r))
      },
    }),
    route({
      method: 'get',
      path: '/health/details',
      roles: ADMIN,
      handler: async (_req, res) => {
        res.json(await health.ready())
      },
    }),
  ]
}
