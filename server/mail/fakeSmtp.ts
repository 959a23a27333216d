import { SMTPServer } from 'smtp-server'
import { simpleParser, type AddressObject } from 'mailparser'
import type { CaughtMail } from '../../shared/schemas/audit'

export interface Mailbox {
  list(): CaughtMail[]
  get(id: number): CaughtMail | undefined
  clear(): void
}

export interface FakeSmtp {
  port: number
  mailbox: Mailbox
  close(): Promise<void>
}

const KEEP = 1000

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return ''
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ')
}

/**
 * A local SMTP server that accepts everything and keeps it in memory, so development and tests
 * exercise the real SMTP path without sending mail anywhere. A message whose Message-ID it
 * already holds is accepted and not kept again, as a receiving side that recognises repeats
 * would do: the outbox sends a mail again with the same id when it cannot know whether an
 * earlier try was taken (a crash mid-send, a timeout after the final dot).
 */
export function startFakeSmtp(port = 0, host = '127.0.0.1'): Promise<FakeSmtp> {
  const messages: CaughtMail[] = []
  let nextId = 1
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream).then((m) => {
        const messageId = m.messageId ?? null
        if (messageId && messages.some((x) => x.messageId === messageId)) return callback()
        messages.unshift({
          id: nextId++,
          messageId,
          receivedAt: new Date().toISOString(),
          from: addresses(m.from),
          to: addresses(m.to),
          subject: m.subject ?? '',
          text: m.text ?? '',
          html: typeof m.html === 'string' ? m.html : '',
        })
        if (messages.length > KEEP) messages.length = KEEP
        callback()
      }, callback)
    },
  })
  const mailbox: Mailbox = {
    list: () => messages.slice(),
    get: (id) => messages.find((m) => m.id === id),
    clear: () => {
      messages.length = 0
    },
  }
  return new Promise((resolvePromise, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => {
      const address = server.server.address()
      const actual = typeof address === 'object' && address ? address.port : port
      resolvePromise({
        port: actual,
        mailbox,
        close: () => new Promise<void>((r) => server.close(() => r())),
      })
    })
  })
}
