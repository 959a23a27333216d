/*
 * `GET /metrics` in the Prometheus text format: request counts and latency by method, route
 * pattern and status class; the outbox by status; the worker pool's load; the process's own
 * figures. Route labels are the route table's patterns (`/api/player/answers/:trialIndex`),
 * never the URL, so no id or token reaches a label and the number of series stays fixed.
 *
 * Who may read it: without a metrics token, only a caller on this machine (a scraper beside
 * the server, or a reverse proxy here forwarding its own requests); with one, whoever sends it
 * as a bearer token, from anywhere. The figures show how busy the panel is, not who is on it.
 */
import { createHash, timingSafeEqual } from 'node:crypto'
import { performance } from 'node:perf_hooks'
import type { Request, RequestHandler, Router } from 'express'
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client'
import type { AppContext } from '../context'
import { forbidden } from '../errors'
import { route, type RouteDef } from './routeTable'

export interface Metrics {
  registry: Registry
  /** Times every request; mount it first. */
  middleware: RequestHandler
  /** Learns the patterns of a mounted router's routes, for the route label. */
  nameRoutes(prefix: string, router: Router): void
  routes(): RouteDef[]
}

export interface MetricsOptions {
  /** When set, readers must send `Authorization: Bearer <token>`; otherwise loopback only. */
  token?: string
}

const METHODS = new Set(['GET', 'HEAD', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS'])
/** Latency buckets in seconds: saves answer in milliseconds, findings and uploads in seconds. */
const BUCKETS = [0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10]

const digest = (s: string) => createHash('sha256').update(s).digest()

/** 127.0.0.0/8 and ::1, also as IPv4-mapped IPv6 addresses. */
export function isLoopback(ip: string | undefined): boolean {
  if (!ip) return false
  const v4 = ip.startsWith('::ffff:') ? ip.slice(7) : ip
  return v4.startsWith('127.') || ip === '::1'
}

export function mayReadMetrics(req: Request, token: string | undefined): boolean {
  if (!token) return isLoopback(req.ip)
  const given = /^Bearer\s+(\S+)$/i.exec(req.headers.authorization ?? '')?.[1]
  // Compared as digests: equal length, so the comparison time says nothing about the token.
  return given !== undefined && timingSafeEqual(digest(given), digest(token))
}

export function createMetrics(ctx: AppContext, options: MetricsOptions = {}): Metrics {
  const registry = new Registry()
  const patterns = new WeakMap<object, string>()
  let processMetrics = false

  const requests = new Histogram({
    name: 'ringdown_http_request_duration_seconds',
    help: 'Time from request to the end of the response, by method, route pattern and status class',
    labelNames: ['method', 'route', 'status_class'] as const,
    buckets: BUCKETS,
    registers: [registry],
  })

  new Gauge({
    name: 'ringdown_outbox_mails',
    help: 'Mails in the outbox, by status',
    labelNames: ['status'] as const,
    registers: [registry],
    async collect() {
      try {
        const rows: { status: string; n: number }[] = await ctx
          .knex('outbox')
          .select('status')
          .count({ n: '*' })
          .groupBy('status')
        this.reset()
        for (const r of rows) this.set({ status: r.status }, Number(r.n))
      } catch (err) {
        // A database that cannot be read shows in readiness; the other figures still matter.
        this.reset()
        ctx.logger.warn({ err }, 'metrics: the outbox could not be read')
      }
    },
  })

  const load = () => ctx.pool.load()
  const gauge = (name: string, help: string, read: () => number) =>
    new Gauge({
      name,
      help,
      registers: [registry],
      collect() {
        this.set(read())
      },
    })
  gauge(
    'ringdown_worker_threads',
    'Threads in the worker pool (0: work runs inline)',
    () => load().threads,
  )
  gauge('ringdown_worker_busy', 'Worker tasks running now', () => load().busy)
  gauge('ringdown_worker_waiting', 'Worker tasks waiting for a free thread', () => load().waiting)
  const counter = (name: string, help: string, read: () => number) =>
    new Counter({
      name,
      help,
      registers: [registry],
      collect() {
        this.reset()
        this.inc(read())
      },
    })
  counter(
    'ringdown_worker_tasks_done_total',
    'Worker tasks finished since start',
    () => load().done,
  )
  counter(
    'ringdown_worker_tasks_failed_total',
    'Worker tasks that failed since start',
    () => load().failed,
  )

  function routeLabel(req: Request): string {
    const matched = req.route ? patterns.get(req.route as object) : undefined
    if (matched) return matched
    return req.originalUrl.startsWith('/api') ? '(no route)' : '(client)'
  }

  return {
    registry,
    middleware(req, res, next) {
      const start = performance.now()
      res.once('finish', () => {
        requests.observe(
          {
            method: METHODS.has(req.method) ? req.method : 'OTHER',
            route: routeLabel(req),
            status_class: `${Math.floor(res.statusCode / 100)}xx`,
          },
          (performance.now() - start) / 1000,
        )
      })
      next()
    },
    nameRoutes(prefix, router) {
      const stack = (router as unknown as { stack: { route?: { path: string } }[] }).stack
      for (const layer of stack)
        if (layer.route)
          patterns.set(layer.route, prefix + (layer.route.path === '/' ? '' : layer.route.path))
    },
    routes: () => [
      route({
        method: 'get',
        path: '/',
        roles: 'public',
        before: [
          (req, _res, next) =>
            next(
              mayReadMetrics(req, options.token)
                ? undefined
                : forbidden('Metrics are read from this machine, or with the metrics token'),
            ),
        ],
        handler: async (_req, res) => {
          // Started on the first scrape: apps built only for a test never start the monitors.
          if (!processMetrics) collectDefaultMetrics({ register: registry })
          processMetrics = true
          res.setHeader('Cache-Control', 'no-store')
          res.setHeader('Content-Type', registry.contentType)
          res.send(await registry.metrics())
        },
      }),
    ],
  }
}
