import { describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { systemClock } from '../../../server/clock'
import { createKnex } from '../../../server/db/knex'
import { prepareDatabase } from '../../../server/db/prepare'
import { signInvitation } from '../../../server/auth/invitationTokens'
import { testConfig } from '../../../server/config'
import { outboxOn, recordingMailer } from './fixtures'

// The outbox migration links mail queued before it to its session and invitation (from the
// personal link in the mail), and puts back to waiting only the session mail the old rule gave
// up on that staff were told had gone: the latest mail of an invitation whose link still works,
// in a session still open.

const VERSION = '20261203000100'
const SECRET = 'migration-test-secret-migration-test'

async function downTo(knex: Knex, version: string) {
  while ((await knex.migrate.currentVersion()) >= version) await knex.migrate.down()
}

const future = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 10)

async function sessionWith(knex: Knex, status: 'open' | 'closed', invites: number) {
  const now = new Date().toISOString()
  const [sessionId] = await knex('sessions').insert({
    name: `Migration ${status}`,
    format: 'pair',
    seed: 'abc',
    status,
    deadline: future,
    created_at: now,
    updated_at: now,
  })
  const invitations: { id: number; link: string }[] = []
  for (let i = 0; i < invites; i++) {
    const [playerId] = await knex('players').insert({
      code: `P-MIG${sessionId}${i}`,
      instruments: '["cello"]',
      level: 'student',
      status: 'active',
      created_at: now,
      updated_at: now,
    })
    const tokenId = `token-${sessionId}-${i}`
    const [id] = await knex('invitations').insert({
      session_id: sessionId,
      player_id: playerId,
      player_index: i,
      token_id: tokenId,
      invited_at: now,
      last_sent_at: now,
    })
    const token = signInvitation(SECRET, systemClock, { jti: tokenId, sub: id }, future)
    invitations.push({ id, link: `http://localhost:3000/p/${token}` })
  }
  return { sessionId, invitations }
}

async function oldMail(knex: Knex, kind: string, status: string, text: string): Promise<number> {
  const [id] = await knex('outbox').insert({
    to: 'someone@example.test',
    subject: kind,
    text,
    html: '<p>…</p>',
    kind,
    status,
    attempts: status === 'failed' ? 6 : 1,
    last_error: status === 'sent' ? null : 'connect ECONNREFUSED',
    created_at: new Date().toISOString(),
    sent_at: status === 'sent' ? new Date().toISOString() : null,
  })
  return id as number
}

describe('the outbox migration', () => {
  it('links old mail to its session and revives only the mail staff were told had gone', async () => {
    const knex = createKnex(':memory:')
    try {
      await prepareDatabase(knex)
      await downTo(knex, VERSION)
      const open = await sessionWith(knex, 'open', 3)
      const closed = await sessionWith(knex, 'closed', 1)
      const [first, revoked, second] = open.invitations
      const sentFirst = await oldMail(knex, 'session_invitation', 'sent', `Open ${first.link}`)
      const gaveUp = await oldMail(knex, 'session_reminder', 'failed', `Again ${first.link}`)
      const ofRevoked = await oldMail(knex, 'session_invitation', 'failed', `x ${revoked.link}`)
      await knex('invitations').where({ id: revoked.id }).update({
        token_id: null,
        revoked_at: new Date().toISOString(),
      })
      const olderFailed = await oldMail(knex, 'session_invitation', 'failed', `${second.link}`)
      const laterSent = await oldMail(knex, 'session_invitation', 'sent', `${second.link}`)
      const ofClosed = await oldMail(
        knex,
        'session_invitation',
        'failed',
        closed.invitations[0].link,
      )
      const staff = await oldMail(knex, 'staff_invite', 'failed', 'Choose a password')
      const unreadable = await oldMail(knex, 'session_invitation', 'pending', 'no link here')

      await knex.migrate.latest()
      const rows = new Map(
        ((await knex('outbox').select('*')) as Record<string, unknown>[]).map((r) => [r.id, r]),
      )

      expect(rows.get(sentFirst)).toMatchObject({
        status: 'sent',
        session_id: open.sessionId,
        invitation_id: first.id,
        message_id: null,
      })
      expect(rows.get(gaveUp)).toMatchObject({
        status: 'pending',
        next_attempt_at: null,
        session_id: open.sessionId,
        invitation_id: first.id,
      })
      expect(rows.get(ofRevoked)).toMatchObject({ status: 'failed', invitation_id: revoked.id })
      // A later mail of that invitation went: the one given up on stays as it was.
      expect(rows.get(olderFailed)).toMatchObject({ status: 'failed', invitation_id: second.id })
      expect(rows.get(laterSent)).toMatchObject({ status: 'sent' })
      expect(rows.get(ofClosed)).toMatchObject({
        status: 'failed',
        session_id: closed.sessionId,
      })
      expect(rows.get(staff)).toMatchObject({ status: 'failed', session_id: null })
      expect(rows.get(unreadable)).toMatchObject({ status: 'pending', session_id: null })

      // The revived mail gets its Message-ID at its first try, on the host of MAIL_FROM.
      const mailer = recordingMailer()
      await outboxOn(knex, mailer, testConfig(), systemClock).deliverDue()
      const revived = await knex('outbox').where({ id: gaveUp }).first()
      expect(revived.status).toBe('sent')
      expect(revived.message_id).toMatch(new RegExp(`^<outbox-${gaveUp}\\.\\w+@ringdown\\.test>$`))
      expect(mailer.sent.find((m) => m.text.startsWith('Again'))?.messageId).toBe(
        revived.message_id,
      )

      // Down drops the columns with a plain DROP COLUMN and keeps every row; up again works.
      await knex('outbox').where({ id: gaveUp }).update({ status: 'sending' })
      const count = async () => Number((await knex('outbox').count({ n: '*' }))[0].n)
      const before = await count()
      await downTo(knex, VERSION)
      expect(await knex.schema.hasColumn('outbox', 'message_id')).toBe(false)
      expect(await count()).toBe(before)
      expect((await knex('outbox').where({ id: gaveUp }).first()).status).toBe('pending')
      await knex.migrate.latest()
      expect(await knex.schema.hasColumn('outbox', 'claimed_at')).toBe(true)
    } finally {
      await knex.destroy()
    }
  })
})
