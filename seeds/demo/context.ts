import type { Knex } from 'knex'
import pino from 'pino'
import { systemClock } from '../../server/clock'
import { loadConfig } from '../../server/config'
import type { AppContext } from '../../server/context'
import { createOutbox } from '../../server/mail/outbox'
import { createWorkerPool } from '../../server/workers/pool'

/**
 * What the services need when the seeds, not a request, call them. Mail is only queued here;
 * the server delivers it when it starts.
 */
export function seedContext(knex: Knex): AppContext {
  const config = loadConfig()
  const logger = pino({ level: 'silent' })
  const mailer = { send: () => Promise.reject(new Error('the seeds only queue mail')) }
  const outbox = createOutbox({ knex, mailer, clock: systemClock, config, logger })
  // The seeds make their audio inline: a thread pool would outlive the knex CLI's run.
  return { knex, config, clock: systemClock, logger, outbox, pool: createWorkerPool(0) }
}
