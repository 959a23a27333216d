import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { buildApp, signInAs, type TestApp } from './helpers'

describe('the API shell', () => {
  let t: TestApp
  beforeAll(async () => {
    t = await buildApp()
  })
  afterAll(() => t.close())

  it('answers the health check without sign-in', async () => {
    const res = await request(t.app).get('/api/health')

    expect(res.status).toBe(200)
    expect(res.body).toEqual({ status: 'ok' })
  })

  it('answers an unknown /api route with a JSON 404', async () => {
    const res = await request(t.app).get('/api/no-such-thing?x=1')

    expect(res.status).toBe(404)
    expect(res.headers['content-type']).toMatch(/json/)
    expect(res.body.error.code).toBe('not_found')
    expect(res.body.error.message).not.toContain('x=1')
  })

  it('refuses malformed JSON with 400 bad_request', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send('{"email": "admin@ringdown.test",')

    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('bad_request')
  })

  it('refuses a JSON body over the size limit with 413', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: 'admin@ringdown.test', password: 'x'.repeat(200_000) })

    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
  })

  it('does not reveal the server software', async () => {
    const res = await request(t.app).get('/api/health')

    expect(res.headers['x-powered-by']).toBeUndefined()
    expect(res.headers['content-security-policy']).toBeDefined()
  })

  // API answers are JSON, never a document: the OWASP REST Security Cheat Sheet's set for APIs
  // (CSP allowing nothing and no framing, nosniff, HSTS, X-Frame-Options DENY); referrer and
  // cross-origin resource policies as on pages. Pages keep the full set.
  it('gives API answers the security headers of an API, and pages the full set', async () => {
    const api = await request(t.app).get('/api/health')
    expect(api.headers['content-security-policy']).toBe("default-src 'none';frame-ancestors 'none'")
    expect(api.headers).toMatchObject({
      'x-content-type-options': 'nosniff',
      'x-frame-options': 'DENY',
      'referrer-policy': 'no-referrer',
      'cross-origin-resource-policy': 'same-origin',
    })
    expect(api.headers['strict-transport-security']).toMatch(/^max-age=\d+/)

    const page = await request(t.app).get('/metrics')
    expect(page.headers['content-security-policy']).toContain("default-src 'self'")
    expect(page.headers['cross-origin-opener-policy']).toBe('same-origin')
    expect(page.headers['x-frame-options']).toBe('SAMEORIGIN')
  })

  it('marks API answers as never stored, with no ETag to revalidate them by', async () => {
    const admin = await signInAs(t.app, 'admin')
    const res = await admin.get('/api/recipes')

    expect(res.status).toBe(200)
    expect(res.headers['cache-control']).toBe('no-store')
    expect(res.headers.etag).toBeUndefined()
  })
})

describe('an unexpected failure', () => {
  it('becomes a bare 500 with code internal and nothing from inside', async () => {
    const t = await buildApp()
    const admin = await signInAs(t.app, 'admin')
    // A table gone missing stands for any fault the code did not foresee.
    await t.knex.schema.dropTable('audit_log')

    const res = await admin.get('/api/audit')

    expect(res.status).toBe(500)
    expect(res.body).toEqual({
      error: { code: 'internal', message: 'Something went wrong on our side' },
    })
    expect(res.text).not.toMatch(/audit_log|sqlite|select|stack/i)
    await t.close()
  })
})
