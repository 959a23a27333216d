import type { Knex } from 'knex'
import request from 'supertest'
import pino, { type Logger } from 'pino'
import { createApp, type RingdownApp } from '../../server/app'
import { testConfig, type Config } from '../../server/config'
import type { Clock } from '../../server/clock'
import { createKnex } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'
import type { Mailbox } from '../../server/mail/fakeSmtp'
import type { Mailer, OutgoingMail } from '../../server/mail/transport'
import type { StaffRole } from '../../shared/constants'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'

export const DEMO = {
  admin: 'admin@ringdown.test',
  developer: 'developer@ringdown.test',
  analyst: 'analyst@ringdown.test',
} as const satisfies Record<StaffRole, string>

export { DEMO_PASSWORD }

/** Collects mail instead of sending it; flip `failing` to play a mail server that is down. */
export interface FakeMailer extends Mailer {
  sent: OutgoingMail[]
  failing: boolean
}

export function fakeMailer(): FakeMailer {
  const mailer: FakeMailer = {
    sent: [],
    failing: false,
    async send(mail) {
      if (mailer.failing) throw new Error('connect ECONNREFUSED 127.0.0.1:2525')
      mailer.sent.push(mail)
    },
  }
  return mailer
}

export interface TestApp {
  app: RingdownApp
  knex: Knex
  mailer: FakeMailer
  config: Config
  /** Waits until mail delivery started by a request has finished. */
  settle(): Promise<void>
  close(): Promise<void>
}

export async function buildApp(
  options: {
    config?: Partial<Config>
    clock?: Clock
    mailer?: Mailer
    mailbox?: Mailbox
    /** Serve the built client (dist/) as the product does, for tests of what pages carry. */
    serveClient?: boolean
    /** A logger to read back, for tests of what the log holds; silent otherwise. */
    logger?: Logger
  } = {},
): Promise<TestApp> {
  const knex = createKnex(':memory:')
  await prepareDatabase(knex)
  const mailer = fakeMailer()
  const config = testConfig(options.config)
  const app = createApp({
    knex,
    config,
    mailer: options.mailer ?? mailer,
    clock: options.clock,
    // Production-mode apps would log every request; tests read responses, not logs.
    logger: options.logger ?? pino({ level: 'silent' }),
    mailbox: options.mailbox,
    serveClient: options.serveClient,
  })
  const settle = () => app.locals.ctx.outbox.settle()
  return {
    app,
    knex,
    mailer,
    config,
    settle,
    async close() {
      await settle()
      await knex.destroy()
    },
  }
}

export type Agent = ReturnType<typeof request.agent>

export async function signIn(app: RingdownApp, email: string, password: string): Promise<Agent> {
  const agent = request.agent(app)
  const res = await agent.post('/api/auth/login').send({ email, password })
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status}`)
  return agent
}

export const signInAs = (app: RingdownApp, role: StaffRole) =>
  signIn(app, DEMO[role], DEMO_PASSWORD)

/** The session cookie a response set, as `name=value`, or undefined. */
export function sessionCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const raw = res.headers['set-cookie'] as string[] | string | undefined
  const all = Array.isArray(raw) ? raw : raw ? [raw] : []
  return all.find((c) => c.startsWith('rd_session='))
}

export function cookieValue(setCookie: string): string {
  return setCookie.split(';')[0]
}

/** The token of the set-password link in a mail's text part (in the fragment; older: query). */
export function linkToken(mail: { text: string }): string {
  const match = /\/set-password[#?]token=([^\s"<]+)/.exec(mail.text)
  if (!match) throw new Error('no set-password link in the mail')
  return decodeURIComponent(match[1])
}

export function lastMailTo(mailer: FakeMailer, to: string): OutgoingMail {
  const mail = mailer.sent.filter((m) => m.to === to).at(-1)
  if (!mail) throw new Error(`no mail to ${to}`)
  return mail
}

let counter = 0
/** A unique invented address, so tests in one file never collide. */
export function uniqueEmail(prefix = 'person'): string {
  counter += 1
  return `${prefix}.${counter}.${Math.random().toString(36).slice(2, 7)}@example.test`
}

/**
 * A staff account made the way a real one is: invited by an admin, password chosen through the
 * mailed link. Returns a signed-in agent for it.
 */
export async function createStaff(
  t: TestApp,
  admin: Agent,
  role: StaffRole,
  password = 'a-long-enough-password',
): Promise<{ id: number; email: string; password: string; agent: Agent }> {
  const email = uniqueEmail(role)
  const invited = await admin.post('/api/staff').send({ email, name: 'Orla Testington', role })
  if (invited.status !== 201) throw new Error(`invite failed: ${invited.status}`)
  await t.settle()
  const token = linkToken(lastMailTo(t.mailer, email))
  const agent = request.agent(t.app)
  const set = await agent.post('/api/auth/set-password').send({ token, password })
  if (set.status !== 200) throw new Error(`set-password failed: ${set.status}`)
  return { id: invited.body.user.id as number, email, password, agent }
}

export function memoryMailbox(): Mailbox {
  return { list: () => [], get: () => undefined, clear: () => {} }
}

/** Whose session an agent carries, or null when the server sees nobody signed in. */
export async function whoIs(agent: Agent | ReturnType<typeof request>): Promise<string | null> {
  const res = await agent.get('/api/auth/me')
  if (res.status !== 200) throw new Error(`/api/auth/me answered ${res.status}`)
  return (res.body.user?.email as string | undefined) ?? null
}
