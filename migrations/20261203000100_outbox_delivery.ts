import type { Knex } from 'knex'

// What the outbox needs to send each mail once and to keep a session's mail waiting while the
// session is open:
// - message_id: the mail's Message-ID, made when it is queued and sent with every try, so a
//   mail sent again after a crash can be recognised as the same message by whoever receives it;
// - claimed_at: when a delivery run took the mail ('sending'), committed before the SMTP
//   conversation starts, so a second run or process never takes it too;
// - session_id, invitation_id: which session (and invitation) a mail belongs to; such mail is
//   tried for as long as the session is open, and the invitations list shows where it stands.
//
// One migration with its data step, kept small and checkable:
// - session and invitation come from the personal link in the mail's text: the link's token
//   names the invitation (`sub`); a mail whose link cannot be read keeps no session and is
//   treated as mail of no session;
// - mail that was sent keeps no Message-ID (which one it went out with was never kept); mail
//   still to send gets one from the outbox at its next try, with the host of MAIL_FROM;
// - a session mail the old rule gave up on goes back to waiting when it is still the latest
//   mail of its invitation, the session is open, its deadline has not passed and the link in it
//   still works: it is the mail staff were told had gone.

const COLUMNS = ['message_id', 'claimed_at', 'session_id', 'invitation_id'] as const
const INDEXES = ['outbox_message_id', 'outbox_session_status', 'outbox_invitation'] as const

/** The invitation id and token id in the personal link of a mail, without checking the key. */
function linkClaims(text: string): { invitationId: number; tokenId: string } | null {
  const token = /\/p\/([A-Za-z0-9_-]+)\.([A-Za-z0-9_-]+)\.[A-Za-z0-9_-]+/.exec(text)
  if (!token) return null
  try {
    const claims = JSON.parse(Buffer.from(token[2], 'base64url').toString('utf8')) as {
      sub?: unknown
      jti?: unknown
    }
    const invitationId = Number(claims.sub)
    if (!Number.isInteger(invitationId) || typeof claims.jti !== 'string') return null
    return { invitationId, tokenId: claims.jti }
  } catch {
    return null
  }
}

interface OldMail {
  id: number
  text: string
  status: string
}

interface InvitationOfMail {
  id: number
  session_id: number
  token_id: string | null
  revoked_at: string | null
  completed_at: string | null
  session_status: string
  deadline: string
}

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn('outbox', 'message_id')))
    await knex.schema.alterTable('outbox', (t) => {
      t.string('message_id', 250)
      t.string('claimed_at', 30)
      // No foreign keys: a mail outlives what it was about, and adding a column with one would
      // make knex rebuild the table on SQLite.
      t.integer('session_id')
      t.integer('invitation_id')
    })
  await knex.raw(
    'create unique index if not exists outbox_message_id on outbox (message_id) where message_id is not null',
  )
  await knex.raw('create index if not exists outbox_session_status on outbox (session_id, status)')
  await knex.raw('create index if not exists outbox_invitation on outbox (invitation_id)')

  const mails: OldMail[] = await knex('outbox')
    .whereIn('kind', ['session_invitation', 'session_reminder'])
    .whereNull('session_id')
    .orderBy('id')
    .select('id', 'text', 'status')
  const today = new Date().toISOString().slice(0, 10)
  const latestOf = new Map<number, number>()
  const linked: { mail: OldMail; inv: InvitationOfMail; tokenId: string }[] = []
  for (const mail of mails) {
    const claims = linkClaims(mail.text)
    if (!claims) continue
    const inv: InvitationOfMail | undefined = await knex('invitations as i')
      .join('sessions as s', 's.id', 'i.session_id')
      .where('i.id', claims.invitationId)
      .first(
        'i.id',
        'i.session_id',
        'i.token_id',
        'i.revoked_at',
        'i.completed_at',
        's.status as session_status',
        's.deadline',
      )
    if (!inv) continue
    await knex('outbox')
      .where({ id: mail.id })
      .update({ session_id: inv.session_id, invitation_id: inv.id })
    latestOf.set(inv.id, mail.id)
    linked.push({ mail, inv, tokenId: claims.tokenId })
  }
  for (const { mail, inv, tokenId } of linked) {
    const stillWanted =
      mail.status === 'failed' &&
      latestOf.get(inv.id) === mail.id &&
      inv.session_status === 'open' &&
      inv.deadline >= today &&
      !inv.revoked_at &&
      !inv.completed_at &&
      inv.token_id === tokenId
    if (stillWanted)
      await knex('outbox')
        .where({ id: mail.id, status: 'failed' })
        .update({ status: 'pending', next_attempt_at: null })
  }
}

export async function down(knex: Knex): Promise<void> {
  // Plain DROP COLUMN: knex would rebuild the SQLite table. An index on a column must go first.
  for (const index of INDEXES) await knex.raw(`drop index if exists ${index}`)
  // A mail taken by a run that never finished goes back to waiting: the old outbox knew no
  // 'sending' and would never look at it again.
  if (await knex.schema.hasColumn('outbox', 'claimed_at'))
    await knex('outbox').where({ status: 'sending' }).update({ status: 'pending' })
  for (const column of COLUMNS)
    if (await knex.schema.hasColumn('outbox', column))
      await knex.raw(`alter table outbox drop column ${column}`)
}
