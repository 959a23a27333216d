import type { Knex } from 'knex'
import type { Logger } from 'pino'
import type { Clock } from './clock'
import type { Config } from './config'
import type { Mailer } from './mail/transport'
import type { Outbox } from './mail/outbox'
import type { Mailbox } from './mail/fakeSmtp'
import type { WorkerPool } from './workers/pool'

/** What createApp is given: everything with side effects comes in from outside. */
export interface AppDeps {
  knex: Knex
  mailer: Mailer
  config: Config
  clock?: Clock
  logger?: Logger
  /** The development mail fake, when one runs: shown on the admin Mailbox page. */
  mailbox?: Mailbox
  /** Threads for heavy work; built from config.workerThreads when not given. */
  pool?: WorkerPool
}

/** What services and routes share once the app is built. */
export interface AppContext {
  knex: Knex
  config: Config
  clock: Clock
  logger: Logger
  outbox: Outbox
  mailbox?: Mailbox
  pool: WorkerPool
}
