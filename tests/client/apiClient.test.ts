import { afterEach, describe, expect, it, vi } from 'vitest'
import { api, ApiError, onUnauthenticated } from '@/api/client'

function answer(status: number, body: unknown) {
  return vi.fn(async () => new Response(JSON.stringify(body), { status }))
}

afterEach(() => {
  vi.unstubAllGlobals()
  onUnauthenticated(() => {})
})

describe('the API client', () => {
  it('returns the JSON of a successful answer', async () => {
    vi.stubGlobal('fetch', answer(200, { status: 'ok' }))
    expect(await api.get('/health')).toEqual({ status: 'ok' })
  })

  it('turns an error answer into an ApiError with its code, fields and rows', async () => {
    vi.stubGlobal(
      'fetch',
      answer(422, {
        error: {
          code: 'validation_failed',
          message: 'Some fields need attention',
          fields: { email: ['Not a valid e-mail address'] },
          rows: [{ row: 3, errors: ['level: bad'] }],
        },
      }),
    )
    const err = (await api.post('/panel/players', {}).catch((e) => e)) as ApiError
    expect(err).toBeInstanceOf(ApiError)
    expect(err.status).toBe(422)
    expect(err.code).toBe('validation_failed')
    expect(err.fields.email).toEqual(['Not a valid e-mail address'])
    expect(err.rows[0].row).toBe(3)
  })

  it('calls the one 401 handler when a session has ended', async () => {
    const handler = vi.fn()
    onUnauthenticated(handler)
    vi.stubGlobal('fetch', answer(401, { error: { code: 'unauthenticated', message: 'x' } }))
    await api.get('/staff').catch(() => {})
    expect(handler).toHaveBeenCalledTimes(1)
  })

  it('does not treat a refused sign-in as an ended session', async () => {
    const handler = vi.fn()
    onUnauthenticated(handler)
    vi.stubGlobal('fetch', answer(401, { error: { code: 'unauthenticated', message: 'x' } }))
    await api.post('/auth/login', {}, { quiet401: true }).catch(() => {})
    expect(handler).not.toHaveBeenCalled()
  })

  it('says the server cannot be reached when the network fails', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => {
        throw new TypeError('Failed to fetch')
      }),
    )
    const err = (await api.get('/health').catch((e) => e)) as ApiError
    expect(err.code).toBe('network')
    expect(err.message).toMatch(/cannot be reached/)
  })

  it('leaves empty query values out of the address', async () => {
    const fetch = answer(200, {})
    vi.stubGlobal('fetch', fetch)
    await api.get('/panel/players', { q: '', level: 'teacher', instrument: undefined })
    expect(fetch.mock.calls[0]).toBeDefined()
    expect((fetch.mock.calls[0] as unknown as [string])[0]).toBe('/api/panel/players?level=teacher')
  })
})
