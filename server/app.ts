import { existsSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import express, { type Express } from 'express'
import helmet from 'helmet'
import cookieParser from 'cookie-parser'
import pino from 'pino'
import { systemClock } from './clock'
import type { AppContext, AppDeps } from './context'
import { createOutbox } from './mail/outbox'
import { createWorkerPool } from './workers/pool'
import { authenticate } from './http/authenticate'
import { errorHandler } from './http/errorHandler'
import { requestLog } from './http/requestLog'
import { sessionGuard } from './http/sessionAccess'
import { sameOriginWrites } from './http/sameOrigin'
import { notFound } from './errors'
import { buildRouter, type RouteDef } from './http/routeTable'
import { createHealth, healthRoutes } from './http/health'
import { createMetrics, type Metrics } from './http/metrics'
import { authRoutes } from './auth/index.ts'
import { staffRoutes } from './staff/index.ts'
import { panelRoutes } from './panel/index.ts'
import { auditRoutes } from './audit/index.ts'
import { mailRoutes } from './mail/index.ts'
import { recipeRoutes } from './recipes/index.ts'
import { clipRoutes } from './clips/index.ts'
import { excerptRoutes } from './excerpts/index.ts'
import { sessionRoutes } from './sessions/index.ts'
import { invitationRoutes } from './invitations/index.ts'
import { playerFlowRoutes, playerRoutes } from './player/index.ts'
import { plannerRoutes } from './planner/index.ts'
import { findingsRoutes } from './findings/index.ts'

export interface MountedTable {
  prefix: string
  routes: RouteDef[]
}

/** Every route table with its mount point: the app mounts these and the role test walks them. */
export function routeTables(
  ctx: AppContext,
  metrics: Metrics = createMetrics(ctx),
): MountedTable[] {
  return [
    { prefix: '/api', routes: healthRoutes(createHealth(ctx)) },
    { prefix: '/metrics', routes: metrics.routes() },
    { prefix: '/api/auth', routes: authRoutes(ctx) },
    { prefix: '/api/staff', routes: staffRoutes(ctx) },
    { prefix: '/api/panel', routes: panelRoutes(ctx) },
    { prefix: '/api/audit', routes: auditRoutes(ctx) },
    { prefix: '/api/mail', routes: mailRoutes(ctx) },
    { prefix: '/api/recipes', routes: recipeRoutes(ctx) },
    { prefix: '/api/clips', routes: clipRoutes(ctx) },
    { prefix: '/api/excerpts', routes: excerptRoutes(ctx) },
    { prefix: '/api/sessions', routes: sessionRoutes(ctx) },
    { prefix: '/api/invitations', routes: invitationRoutes(ctx) },
    { prefix: '/api/player', routes: playerRoutes(ctx) },
    { prefix: '/api/player', routes: playerFlowRoutes(ctx) },
    { prefix: '/api/planner', routes: plannerRoutes(ctx) },
    { prefix: '/api/findings', routes: findingsRoutes(ctx) },
  ]
}

const distDir = fileURLToPath(new URL('../dist', import.meta.url))

export interface RingdownApp extends Express {
  locals: Express['locals'] & { ctx: AppContext; tables: MountedTable[] }
}

export function createApp(
  deps: AppDeps & {
    serveClient?: boolean
    /** Lets `/metrics` be read with this bearer token from anywhere, not only from loopback. */
    metricsToken?: string
  },
): RingdownApp {
  const clock = deps.clock ?? systemClock
  const logger = deps.logger ?? pino({ level: deps.config.env === 'test' ? 'silent' : 'info' })
  const ctx: AppContext = {
    knex: deps.knex,
    config: deps.config,
    clock,
    logger,
    mailbox: deps.mailbox,
    outbox: createOutbox({
      knex: deps.knex,
      mailer: deps.mailer,
      clock,
      config: deps.config,
      logger,
    }),
    pool:
      deps.pool ??
      createWorkerPool(deps.config.workerThreads, { warmUpDatabase: deps.config.databaseFile }),
  }

  const app = express() as unknown as RingdownApp
  app.disable('x-powered-by')
  // API answers are never stored (no-store below), so an ETag, a hash of every body, only costs
  // time; static files get theirs from express.static, which does not read this setting.
  app.set('etag', false)
  app.set('trust proxy', 'loopback')
  // First, so that the time of everything below is counted.
  const metrics = createMetrics(ctx, { token: deps.metricsToken })
  app.use(metrics.middleware)
  // Pages get the full set of browser protections. API answers are JSON (and audio), never a
  // document: they get the set the OWASP REST Security Cheat Sheet gives for APIs (a CSP that
  // allows nothing and no framing, nosniff, HSTS, framing refused, no referrer, same-origin
  // resources). The document-only headers add nothing to JSON and are a third of every answer
  // save's bytes on the wire.
  const pageHeaders = helmet({
    contentSecurityPolicy: {
      directives: {
        'img-src': ["'self'", 'data:', 'blob:'],
        'media-src': ["'self'", 'blob:'],
        'font-src': ["'self'", 'data:'],
        'style-src': ["'self'", "'unsafe-inline'"],
        // Plain http on localhost in development must not be upgraded.
        'upgrade-insecure-requests': deps.config.env === 'production' ? [] : null,
      },
    },
  })
  const apiHeaders = helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: { 'default-src': ["'none'"], 'frame-ancestors': ["'none'"] },
    },
    xFrameOptions: { action: 'deny' },
    crossOriginOpenerPolicy: false,
    originAgentCluster: false,
    xDnsPrefetchControl: false,
    xDownloadOptions: false,
    xPermittedCrossDomainPolicies: false,
    xXssProtection: false,
  })
  app.use((req, res, next) =>
    (req.url.startsWith('/api/') ? apiHeaders : pageHeaders)(req, res, next),
  )
  app.use(requestLog(logger))
  app.use('/api', sameOriginWrites(deps.config.publicUrl))
  // API answers carry people's names, addresses and results: no shared or stored copies unless
  // a route says otherwise (audio sets its own).
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store')
    next()
  })
  app.use('/api', express.json({ limit: deps.config.jsonLimit }), cookieParser())
  app.use('/api', authenticate(ctx))

  const tables = routeTables(ctx, metrics)
  const guard = sessionGuard(ctx.knex)
  for (const t of tables) {
    const router = buildRouter(t.routes, guard)
    metrics.nameRoutes(t.prefix, router)
    app.use(t.prefix, router)
  }
  app.use('/api', (req, _res, next) =>
    next(notFound(`API route ${req.method} ${req.originalUrl.split('?')[0]}`)),
  )

  if (deps.serveClient && existsSync(distDir)) {
    app.use(express.static(distDir, { index: false, maxAge: '1h' }))
    // The client routes everything else; index.html is never cached so new builds show at once.
    app.get('/{*path}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache')
      res.sendFile('index.html', { root: distDir })
    })
  }

  app.use(errorHandler(logger))
  app.locals.ctx = ctx
  app.locals.tables = tables
  return app
}
