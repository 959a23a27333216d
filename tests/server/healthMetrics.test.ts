import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { buildApp, signInAs, type TestApp } from './helpers'

// Liveness answers without touching storage; readiness names each part. The metrics are in the
// Prometheus text exposition format (prometheus.io/docs/instrumenting/exposition_formats:
// `# HELP`, `# TYPE`, then `name{labels} value` lines).
describe('health and metrics', () => {
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp()
  })
  afterAll(() => t.close())

  it('liveness says ok and readiness reports each part without details to the public', async () => {
    expect((await request(t.app).get('/api/health').expect(200)).body).toEqual({ status: 'ok' })
    const ready = await request(t.app).get('/api/health/ready').expect(200)
    expect(ready.body).toEqual({
      status: 'ready',
      parts: { database: 'ok', media: 'ok', mail: 'ok', workers: 'ok' },
    })
    await request(t.app).get('/api/health/details').expect(401)
    const admin = await signInAs(t.app, 'admin')
    const details = (await admin.get('/api/health/details').expect(200)).body
    expect(details.parts.database.status).toBe('ok')
    expect(details.parts.mail).toMatchObject({ waiting: expect.any(Number) })
  })

  it('a database that cannot be written makes the server not ready', async () => {
    await t.knex.raw('pragma query_only = 1')
    try {
      // Readiness is cached for two seconds; a fresh app reads it anew.
      const fresh = await request(t.app).get('/api/health/ready')
      if (fresh.body.parts.database === 'ok') await new Promise((r) => setTimeout(r, 2100))
      const res = await request(t.app).get('/api/health/ready')
      expect(res.status).toBe(503)
      expect(res.body).toMatchObject({ status: 'not_ready', parts: { database: 'failing' } })
    } finally {
      await t.knex.raw('pragma query_only = 0')
    }
  })

  it('is not ready while the worker threads are still starting', async () => {
    const fresh = await buildApp()
    try {
      const pool = fresh.app.locals.ctx.pool
      const load = pool.load.bind(pool)
      pool.load = () => ({ ...load(), starting: true })
      const res = await request(fresh.app).get('/api/health/ready')
      expect(res.status).toBe(503)
      expect(res.body).toMatchObject({ status: 'not_ready', parts: { workers: 'failing' } })
    } finally {
      await fresh.close()
    }
  })

  it('exposes request latencies by route pattern, outbox depth and worker load', async () => {
    await request(t.app).get('/api/health').expect(200)
    const res = await request(t.app).get('/metrics').expect(200)
    expect(res.headers['content-type']).toMatch(/^text\/plain/)
    expect(res.text).toContain('# TYPE ringdown_http_request_duration_seconds histogram')
    expect(res.text).toMatch(
      /ringdown_http_request_duration_seconds_count\{method="GET",route="\/api\/health",status_class="2xx"\} \d+/,
    )
    expect(res.text).toContain('# TYPE ringdown_outbox_mails gauge')
    expect(res.text).toMatch(/ringdown_worker_threads \d+/)
    expect(res.text).toMatch(/ringdown_worker_waiting \d+/)
  })
})
