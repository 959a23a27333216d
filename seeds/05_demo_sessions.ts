import type { Knex } from 'knex'
import pino from 'pino'
import { systemClock } from '../server/clock'
import { loadConfig } from '../server/config'
import { createOutbox } from '../server/mail/outbox'
import { seedDemoSessions } from './demo/sessions'
import type { AppContext } from '../server/context'

/**
 * Demo sessions over the demo recipes and clips (seeded just before). Skipped in production,
 * once any session exists, and under tests, which have no demo clips and build their own.
 * Invitation mails are only queued here; the server delivers them when it starts.
 */
export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production' || process.env.NODE_ENV === 'test') return
  if (await knex('sessions').first('id')) return
  const config = loadConfig()
  const logger = pino({ level: 'silent' })
  const mailer = {
    send: () => Promise.reject(new Error('the seed only queues mail')),
  }
  const outbox = createOutbox({ knex, mailer, clock: systemClock, config, logger })
  const ctx: AppContext = { knex, config, clock: systemClock, logger, outbox }
  await seedDemoSessions(ctx)
}
