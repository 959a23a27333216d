import { createServer, type Socket } from 'node:net'
import type { Knex } from 'knex'
import pino from 'pino'
import type { Clock } from '../../../server/clock'
import type { Config } from '../../../server/config'
import { createOutbox, type QueuedMail } from '../../../server/mail/outbox'
import type { Mailer, OutgoingMail } from '../../../server/mail/transport'
import type { Agent, TestApp } from '../helpers'
import { isoDay, openStudy, studyFixture } from '../sessionFixtures'

/** Production's mail settings (server/config.ts defaults): the old rule gave up after 6 tries. */
export const PRODUCTION_MAIL: Config['mail'] = {
  maxAttempts: 6,
  retryBaseMs: 30_000,
  retryMaxMs: 15 * 60_000,
  connectTimeoutMs: 10_000,
  sendTimeoutMs: 30_000,
  pollMs: 10_000,
}

/** A mailer that keeps every try, fails while `failing`, and can take its time. */
export interface RecordingMailer extends Mailer {
  tries: OutgoingMail[]
  sent: OutgoingMail[]
  failing: boolean
  delayMs: number
}

export function recordingMailer(): RecordingMailer {
  const m: RecordingMailer = {
    tries: [],
    sent: [],
    failing: false,
    delayMs: 0,
    async send(mail) {
      m.tries.push(mail)
      if (m.delayMs) await new Promise((r) => setTimeout(r, m.delayMs))
      if (m.failing) throw new Error('connect ECONNREFUSED 127.0.0.1:2525')
      m.sent.push(mail)
    },
  }
  return m
}

export function outboxOn(knex: Knex, mailer: Mailer, config: Config, clock: Clock) {
  return createOutbox({ knex, mailer, config, clock, logger: pino({ level: 'silent' }) })
}

export const plainMail = (to: string, extra: Partial<QueuedMail> = {}): QueuedMail => ({
  to,
  subject: `Hello ${to}`,
  text: 'Hi',
  html: '<p>Hi</p>',
  kind: 'test',
  ...extra,
})

/** Queues mails inside a transaction, as services do, so no delivery starts on its own. */
export async function queueMails(
  knex: Knex,
  outbox: ReturnType<typeof outboxOn>,
  mails: QueuedMail[],
): Promise<number[]> {
  return knex.transaction(async (trx) => {
    const ids: number[] = []
    for (const m of mails) ids.push(await outbox.enqueue(m, trx))
    return ids
  })
}

/**
 * A TCP server that accepts connections and, unless told to greet, never says a word: a mail
 * server that hangs. With `greet` it sends the 220 greeting and then stays silent.
 */
export async function silentServer(greet = false) {
  const sockets = new Set<Socket>()
  let connections = 0
  let closedByClient = 0
  const server = createServer((socket) => {
    connections++
    sockets.add(socket)
    socket.on('error', () => {})
    // Reads and ignores what the client says, so its closing is seen at once.
    socket.resume()
    socket.on('close', () => {
      closedByClient++
      sockets.delete(socket)
    })
    if (greet) socket.write('220 quiet.example.test ESMTP\r\n')
  })
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r))
  const address = server.address()
  const port = typeof address === 'object' && address ? address.port : 0
  return {
    port,
    connections: () => connections,
    closedByClient: () => closedByClient,
    close: () =>
      new Promise<void>((r) => {
        for (const s of sockets) s.destroy()
        server.close(() => r())
      }),
  }
}

/** An open listening session made through the API, deadline in `days` days. */
export async function openSession(t: TestApp, developer: Agent, days = 10) {
  const { recipeIds, clipSets } = await studyFixture(t.knex, 2, 1, 'Outage')
  return openStudy(developer, {
    name: 'Core damping check',
    playerTitle: 'Evening listening',
    format: 'pair',
    recipeIds,
    clipSets,
    deadline: isoDay(t.app.locals.ctx.clock.now(), days),
  })
}

export async function emailsOf(knex: Knex, playerIds: number[]): Promise<string[]> {
  const rows: { id: number; email: string }[] = await knex('players')
    .whereIn('id', playerIds)
    .select('id', 'email')
  return playerIds.map((id) => rows.find((r) => r.id === id)!.email)
}
