import { describe, expect, it } from 'vitest'
import { randomBytes } from 'node:crypto'
import { loadConfig } from '../../../server/config'

// A cookie signed with a guessable key can be forged offline. RFC 7518 §3.2: an HS256 key must
// be at least 256 bits; a random 48-byte key in base64 (what the message suggests) is 64 chars.

const production = (secret: string) => ({
  NODE_ENV: 'production',
  JWT_SECRET: secret,
  SMTP_URL: 'smtp://mail.example.test',
  DATABASE_FILE: ':memory:',
})

describe('production start-up', () => {
  it.each([
    ['x'],
    ['secret'],
    ['aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa'],
    ['abababababababababababababababababababab'],
    ['my-jwt-secret-change-me-please-123'],
    ['changeme-changeme-changeme-changeme'],
  ])('refuses the signing secret %j with a clear message', (secret) => {
    expect(() => loadConfig(production(secret))).toThrow(/JWT_SECRET .*openssl rand/)
  })

  it('refuses to start without a secret at all', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' })).toThrow(/JWT_SECRET is required/)
  })

  it('takes a random one', () => {
    const secret = randomBytes(48).toString('base64')
    expect(loadConfig(production(secret)).jwtSecret).toBe(secret)
  })
})
