import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { AddressInfo } from 'node:net'
import type { Server } from 'node:http'
import { chromium, type Browser } from 'playwright-core'
import pino from 'pino'
import { createApp } from '../../server/app'
import { loadConfig } from '../../server/config'
import type { Clock } from '../../server/clock'
import { createKnex } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'
import { startFakeSmtp } from '../../server/mail/fakeSmtp'
import { smtpMailer } from '../../server/mail/transport'

export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium'
export const SHOTS = join(import.meta.dirname, 'screenshots')

/**
 * The built client and the real server on a fresh database file, with the local mail fake:
 * the same pieces `npm start` runs, on a free port.
 */
export async function startProduct() {
  if (!existsSync(join(import.meta.dirname, '../../dist/index.html'))) {
    throw new Error('The client is not built: run `npm run build` (npm test does it first)')
  }
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-e2e-'))
  const config = loadConfig({
    NODE_ENV: 'development',
    DATABASE_FILE: join(dir, 'e2e.sqlite'),
    MEDIA_DIR: join(dir, 'media'),
    JWT_SECRET: 'e2e-secret-e2e-secret-e2e-secret',
    BCRYPT_COST: '4',
  })
  const knex = createKnex(config.databaseFile)
  await prepareDatabase(knex)
  const fake = await startFakeSmtp()
  // The real time, but one a test can move on past a pause the server enforces.
  let skew = 0
  const clock: Clock = { now: () => new Date(Date.now() + skew) }
  const app = createApp({
    knex,
    config,
    clock,
    mailer: smtpMailer({ host: '127.0.0.1', port: fake.port }),
    mailbox: fake.mailbox,
    serveClient: true,
    logger: pino({ level: 'warn' }),
  })
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s))
  })
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  app.locals.ctx.config.publicUrl = base
  return {
    base,
    mailbox: fake.mailbox,
    /** Moves the server's clock on by `ms`. */
    skipAhead(ms: number) {
      skew += ms
    },
    async stop() {
      await new Promise((r) => server.close(r))
      await app.locals.ctx.outbox.settle()
      // The worker threads start (and warm up) with the app; they would outlive the test.
      await app.locals.ctx.pool.close()
      await fake.close()
      await knex.destroy()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}

export async function launchBrowser(): Promise<Browser> {
  if (!existsSync(CHROMIUM)) {
    // A missing browser is a failure, never a skip: CI must prove the screens work.
    throw new Error(`Browser tests need Chromium at ${CHROMIUM}: apt-get install -y chromium`)
  }
  mkdirSync(SHOTS, { recursive: true })
  return chromium.launch({
    executablePath: CHROMIUM,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  })
}
