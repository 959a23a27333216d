import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { availableParallelism } from 'node:os'

export interface Config {
  env: 'development' | 'production' | 'test'
  port: number
  /** Where links in e-mails point; defaults to the local server. */
  publicUrl: string
  databaseFile: string
  /** SQLite's `synchronous` setting: FULL keeps every acknowledged write through a power cut. */
  databaseSynchronous: 'FULL' | 'NORMAL'
  mediaDir: string
  /** Largest single uploaded recording, in MB. */
  uploadMaxMb: number
  /** Largest total of one upload request (a batch of recordings), in MB. */
  uploadBatchMaxMb: number
  smtpUrl: string | null
  mailFrom: string
  jwtSecret: string
  /** Session cookie lifetime; renewed while in use. */
  sessionMinutes: number
  bcryptCost: number
  loginRateLimit: { windowMs: number; max: number }
  /** Failed sign-ins per account within the window before that account waits. */
  accountThrottle: { windowMs: number; maxFailures: number }
  /** Mail throttles: per recipient and per session. */
  mailLimits: {
    /** Least time between two reminders to one player. */
    reminderGapMs: number
    /** Most invitation and reminder mails one session may queue in an hour: above the largest
     * invite (500), so inviting a whole panel at once still works. */
    sessionMailsPerHour: number
    /** Most password-reset mails one address receives in an hour. */
    resetsPerHour: number
  }
  jsonLimit: string
  mail: {
    /** Tries for a mail that belongs to no session (sign-in links, staff invitations); a
     * session's mail is tried for as long as its session is open. */
    maxAttempts: number
    retryBaseMs: number
    /** The longest wait between two tries, however many have failed. */
    retryMaxMs: number
    /** Connecting and the server's greeting each get this long before the try counts as failed. */
    connectTimeoutMs: number
    /** A whole SMTP conversation for one mail gets at most this long. */
    sendTimeoutMs: number
    pollMs: number
  }
  /** Threads for findings and clip analysis; 0 runs them on the main thread (tests). */
  workerThreads: number
  /** How often leftover upload parts, orphan originals and renditions without rows are removed. */
  sweepMinutes: number
  /** The longest SIGTERM waits for requests in flight before the process exits. */
  shutdownGraceMs: number
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

/** Words people put in a secret when they mean to change it later. */
const PLACEHOLDERS =
  /secret|password|changeme|change-me|example|default|ringdown|jwt|token|test|demo/i

/**
 * Why a signing secret is too weak to sign session cookies with, or null. HS256 wants a key at
 * least as long as its 256-bit output (RFC 7518 §3.2); 32 characters of `openssl rand -base64`
 * are about 192 bits, so we ask for 32 characters from at least 12 different ones, and refuse
 * the placeholders a guesser tries first.
 */
export function secretProblem(secret: string): string | null {
  if (secret.length < 32)
    return 'must be at least 32 characters: make one with `openssl rand -base64 48`'
  if (new Set(secret).size < 12)
    return 'repeats too few characters to be random: make one with `openssl rand -base64 48`'
  if (
    PLACEHOLDERS.test(secret) &&
    new Set(secret.replace(new RegExp(PLACEHOLDERS, 'gi'), '')).size < 12
  )
    return 'looks like a placeholder: make one with `openssl rand -base64 48`'
  return null
}

function int(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value === '') return fallback
  const n = Number(value)
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a non-negative number`)
  return n
}

function synchronousOf(value: string | undefined): Config['databaseSynchronous'] {
  if (value === undefined || value === '') return 'FULL'
  const v = value.toUpperCase()
  if (v !== 'FULL' && v !== 'NORMAL') throw new Error('DATABASE_SYNCHRONOUS must be FULL or NORMAL')
  return v
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const nodeEnv =
    env.NODE_ENV === 'production' ? 'production' : env.NODE_ENV === 'test' ? 'test' : 'development'
  const port = int(env.PORT, 3000, 'PORT')
  const databaseFile = env.DATABASE_FILE || DEFAULT_DB
  if (nodeEnv === 'production') {
    if (!env.JWT_SECRET) throw new Error('JWT_SECRET is required when NODE_ENV=production')
    const problem = secretProblem(env.JWT_SECRET)
    if (problem) throw new Error(`JWT_SECRET ${problem}`)
  }
  return {
    env: nodeEnv,
    port,
    publicUrl: (env.PUBLIC_URL || `http://localhost:${port}`).replace(/\/$/, ''),
    databaseFile,
    databaseSynchronous: synchronousOf(env.DATABASE_SYNCHRONOUS),
    mediaDir: env.MEDIA_DIR || 'media',
    uploadMaxMb: int(env.UPLOAD_MAX_MB, 200, 'UPLOAD_MAX_MB'),
    uploadBatchMaxMb: int(env.UPLOAD_BATCH_MAX_MB, 1000, 'UPLOAD_BATCH_MAX_MB'),
    smtpUrl: env.SMTP_URL || null,
    mailFrom: env.MAIL_FROM || 'Ringdown <no-reply@ringdown.test>',
    jwtSecret: env.JWT_SECRET || localSecret(databaseFile),
    sessionMinutes: int(env.SESSION_MINUTES, 30, 'SESSION_MINUTES'),
    bcryptCost: int(env.BCRYPT_COST, 10, 'BCRYPT_COST'),
    loginRateLimit: {
      windowMs: int(env.LOGIN_RATE_WINDOW_MS, 15 * 60_000, 'LOGIN_RATE_WINDOW_MS'),
      max: int(env.LOGIN_RATE_MAX, 20, 'LOGIN_RATE_MAX'),
    },
    accountThrottle: {
      windowMs: int(env.ACCOUNT_THROTTLE_WINDOW_MS, 15 * 60_000, 'ACCOUNT_THROTTLE_WINDOW_MS'),
      maxFailures: int(env.ACCOUNT_THROTTLE_MAX, 10, 'ACCOUNT_THROTTLE_MAX'),
    },
    mailLimits: {
      reminderGapMs: int(env.REMINDER_GAP_HOURS, 12, 'REMINDER_GAP_HOURS') * 3_600_000,
      sessionMailsPerHour: int(env.SESSION_MAILS_PER_HOUR, 600, 'SESSION_MAILS_PER_HOUR'),
      resetsPerHour: int(env.RESETS_PER_HOUR, 3, 'RESETS_PER_HOUR'),
    },
    jsonLimit: env.JSON_LIMIT || '100kb',
    mail: {
      maxAttempts: int(env.MAIL_MAX_ATTEMPTS, 6, 'MAIL_MAX_ATTEMPTS'),
      retryBaseMs: int(env.MAIL_RETRY_BASE_MS, 30_000, 'MAIL_RETRY_BASE_MS'),
      retryMaxMs: int(env.MAIL_RETRY_MAX_MS, 15 * 60_000, 'MAIL_RETRY_MAX_MS'),
      connectTimeoutMs: int(env.MAIL_CONNECT_TIMEOUT_MS, 10_000, 'MAIL_CONNECT_TIMEOUT_MS'),
      sendTimeoutMs: int(env.MAIL_SEND_TIMEOUT_MS, 30_000, 'MAIL_SEND_TIMEOUT_MS'),
      pollMs: int(env.MAIL_POLL_MS, 10_000, 'MAIL_POLL_MS'),
    },
    workerThreads: int(
      env.WORKER_THREADS,
      Math.max(1, availableParallelism() - 1),
      'WORKER_THREADS',
    ),
    sweepMinutes: int(env.SWEEP_MINUTES, 60, 'SWEEP_MINUTES'),
    shutdownGraceMs: int(env.SHUTDOWN_GRACE_MS, 8_000, 'SHUTDOWN_GRACE_MS'),
  }
}

/** A config for tests: in-memory database, cheap hashes, a fixed secret. */
export function testConfig(overrides: Partial<Config> = {}): Config {
  return {
    env: 'test',
    port: 0,
    publicUrl: 'http://localhost:3000',
    databaseFile: ':memory:',
    databaseSynchronous: 'FULL',
    mediaDir: 'media',
    uploadMaxMb: 200,
    uploadBatchMaxMb: 1000,
    smtpUrl: null,
    mailFrom: 'Ringdown <no-reply@ringdown.test>',
    jwtSecret: 'test-secret-test-secret-test-secret',
    sessionMinutes: 30,
    bcryptCost: 4,
    loginRateLimit: { windowMs: 60_000, max: 1000 },
    accountThrottle: { windowMs: 15 * 60_000, maxFailures: 10 },
    mailLimits: { reminderGapMs: 12 * 3_600_000, sessionMailsPerHour: 600, resetsPerHour: 3 },
    jsonLimit: '100kb',
    mail: {
      maxAttempts: 3,
      retryBaseMs: 1000,
      retryMaxMs: 8000,
      connectTimeoutMs: 2000,
      sendTimeoutMs: 5000,
      pollMs: 0,
    },
    workerThreads: 0,
    sweepMinutes: 0,
    shutdownGraceMs: 8_000,
    ...overrides,
  }
}
