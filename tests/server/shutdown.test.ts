import { mkdtempSync, rmSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { createKnex } from '../../server/db/knex'
import { startServer } from '../bench/serverProcess'
import { silentServer } from './mail/fixtures'

// SIGTERM as a process manager sends it (systemd, Kubernetes and Docker wait 10 s by default
// before SIGKILL: common practice). The real server runs as its own process, its mail goes to
// an SMTP server that greets and then never answers, and a request is still arriving when the
// signal comes. The process must end by itself within the 10 s, answer the request in flight,
// refuse new connections, and leave the mail waiting, not failed and not sent.

const PORT = 3961
const GRACE_MS = 3000
const dir = mkdtempSync(join(tmpdir(), 'ringdown-shutdown-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

/** A request whose body arrives in two halves, the second only when `finish` is called. */
function slowRequest(base: string) {
  const body = JSON.stringify({ email: 'developer@ringdown.test' })
  const slow = { answered: Promise.resolve(0), finish: () => {} }
  slow.answered = new Promise<number>((resolve, reject) => {
    const req = httpRequest(
      `${base}/api/auth/forgot`,
      {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'content-length': body.length },
      },
      (res) => {
        res.resume()
        res.on('end', () => resolve(res.statusCode ?? 0))
      },
    )
    req.on('error', reject)
    req.write(body.slice(0, 10))
    slow.finish = () => req.end(body.slice(10))
  })
  return slow
}

describe('SIGTERM', () => {
  it('ends the process within 10 s with SMTP hanging, answering the request in flight and keeping the mail', async () => {
    const smtp = await silentServer(true)
    const databaseFile = join(dir, 'db.sqlite')
    const server = await startServer({
      port: PORT,
      databaseFile,
      mediaDir: join(dir, 'media'),
      env: {
        SMTP_URL: `smtp://127.0.0.1:${smtp.port}`,
        // Far beyond the grace: only the shutdown can end the conversation.
        MAIL_CONNECT_TIMEOUT_MS: '60000',
        MAIL_SEND_TIMEOUT_MS: '60000',
        MAIL_POLL_MS: '200',
        SHUTDOWN_GRACE_MS: String(GRACE_MS),
      },
      // The mail part is not ready with SMTP hanging; the server is alive all the same.
      waitFor: 'alive',
    })
    const { base, child } = server
    try {
      // A reset mail is queued, and its SMTP conversation starts and hangs.
      const queued = await fetch(`${base}/api/auth/forgot`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: 'admin@ringdown.test' }),
      })
      expect(queued.status).toBeLessThan(300)
      for (let i = 0; i < 100 && smtp.connections() === 0; i++)
        await new Promise((r) => setTimeout(r, 50))
      expect(smtp.connections()).toBeGreaterThan(0)

      const inFlight = slowRequest(base)
      await new Promise((r) => setTimeout(r, 200))
      const signalled = performance.now()
      child.kill('SIGTERM')
      await new Promise((r) => setTimeout(r, 300))
      // A new connection is refused while the old one is still served.
      const late = await fetch(`${base}/api/health`).then(
        (r) => r.status,
        () => 'refused',
      )
      inFlight.finish()
      const status = await inFlight.answered
      const code = await server.exited
      const took = performance.now() - signalled

      expect(late).toBe('refused')
      expect(status).toBeLessThan(300)
      expect(code).toBe(0)
      expect(took).toBeLessThan(10_000)
      // The grace is given to the mail in flight before it is cut off.
      expect(took).toBeGreaterThanOrEqual(GRACE_MS - 100)

      const knex = createKnex(databaseFile)
      try {
        const mails = await knex('outbox').select('status', 'message_id', 'sent_at')
        expect(mails.length).toBeGreaterThan(0)
        for (const m of mails) {
          expect(m.status).toBe('pending')
          expect(m.sent_at).toBeNull()
        }
        expect(mails.some((m) => m.message_id)).toBe(true)
      } finally {
        await knex.destroy()
      }
    } finally {
      child.kill('SIGKILL')
      await smtp.close()
    }
  }, 60_000)
})
