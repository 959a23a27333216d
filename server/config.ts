import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'

export interface Config {
  env: 'development' | 'production' | 'test'
  port: number
  /** Where links in e-mails point; defaults to the local server. */
  publicUrl: string
  databaseFile: string
  mediaDir: string
  /** Largest single uploaded recording, in MB. */
  uploadMaxMb: number
  smtpUrl: string | null
  mailFrom: string
  jwtSecret: string
  /** Session cookie lifetime; renewed while in use. */
  sessionMinutes: number
  bcryptCost: number
  loginRateLimit: { windowMs: number; max: number }
  jsonLimit: string
  mail: { maxAttempts: number; retryBaseMs: number; pollMs: number }
}

const DEFAULT_DB = 'data/ringdown.sqlite'

/** The development JWT secret is generated once and kept beside the database, never committed. */
function localSecret(databaseFile: string): string {
  const file = resolve(
    dirname(databaseFile === ':memory:' ? DEFAULT_DB : databaseFile),
    '.jwt-secret',
  )
  if (existsSync(file)) return readFileSync(file, 'utf8').trim()
  mkdirSync(dirname(file), { recursive: true })
  const secret = randomBytes(48).toString('base64url')
  writeFileSync(file, secret, { mode: 0o600 })
  return secret
}

function int(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value === '') return fallback
  const n = Number(value)
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a non-negative number`)
  return n
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const nodeEnv =
    env.NODE_ENV === 'production' ? 'production' : env.NODE_ENV === 'test' ? 'test' : 'development'
  const port = int(env.PORT, 3000, 'PORT')
  const databaseFile = env.DATABASE_FILE || DEFAULT_DB
  if (nodeEnv === 'production' && !env.JWT_SECRET) {
    throw new Error('JWT_SECRET is required when NODE_ENV=production')
  }
  return {
    env: nodeEnv,
    port,
    publicUrl: (env.PUBLIC_URL || `http://localhost:${port}`).replace(/\/$/, ''),
    databaseFile,
    mediaDir: env.MEDIA_DIR || 'media',
    uploadMaxMb: int(env.UPLOAD_MAX_MB, 200, 'UPLOAD_MAX_MB'),
    smtpUrl: env.SMTP_URL || null,
    mailFrom: env.MAIL_FROM || 'Ringdown <no-reply@ringdown.test>',
    jwtSecret: env.JWT_SECRET || localSecret(databaseFile),
    sessionMinutes: int(env.SESSION_MINUTES, 30, 'SESSION_MINUTES'),
    bcryptCost: int(env.BCRYPT_COST, 10, 'BCRYPT_COST'),
    loginRateLimit: {
      windowMs: int(env.LOGIN_RATE_WINDOW_MS, 15 * 60_000, 'LOGIN_RATE_WINDOW_MS'),
      max: int(env.LOGIN_RATE_MAX, 20, 'LOGIN_RATE_MAX'),
    },
    jsonLimit: env.JSON_LIMIT || '100kb',
    mail: {
      maxAttempts: int(env.MAIL_MAX_ATTEMPTS, 6, 'MAIL_MAX_ATTEMPTS'),
      retryBaseMs: int(env.MAIL_RETRY_BASE_MS, 30_000, 'MAIL_RETRY_BASE_MS'),
      pollMs: int(env.MAIL_POLL_MS, 10_000, 'MAIL_POLL_MS'),
    },
  }
}

/** A config for tests: in-memory database, cheap hashes, a fixed secret. */
export function testConfig(overrides: Partial<Config> = {}): Config {
  return {
    env: 'test',
    port: 0,
    publicUrl: 'http://localhost:3000',
    databaseFile: ':memory:',
    mediaDir: 'media',
    uploadMaxMb: 200,
    smtpUrl: null,
    mailFrom: 'Ringdown <no-reply@ringdown.test>',
    jwtSecret: 'test-secret-test-secret-test-secret',
    sessionMinutes: 30,
    bcryptCost: 4,
    loginRateLimit: { windowMs: 60_000, max: 1000 },
    jsonLimit: '100kb',
    mail: { maxAttempts: 3, retryBaseMs: 1000, pollMs: 0 },
    ...overrides,
  }
}
