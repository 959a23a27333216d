import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { renderMail } from '../mail/template'
import type { UserRow } from './accounts'

// The mails about an account's password. Each is queued in the caller's transaction; the caller
// starts delivery once it has committed.

export async function queueResetMail(ctx: AppContext, trx: Knex, user: UserRow, url: string) {
  const mail = renderMail({
    subject: 'Reset your Ringdown password',
    greeting: `Hello ${user.name},`,
    paragraphs: [
      'Someone asked to reset the password of your Ringdown account. If it was you, choose a new password with the link below. It works once and for one hour.',
      'If it was not you, ignore this mail: your password stays as it is.',
    ],
    action: { label: 'Choose a new password', url },
  })
  await ctx.outbox.enqueue({ to: user.email, kind: 'password_reset', ...mail }, trx)
}

/** Tells the owner at once, so a change they did not make does not go unnoticed. */
export async function queuePasswordChangedMail(ctx: AppContext, trx: Knex, user: UserRow) {
  const when = `${ctx.clock.now().toISOString().slice(0, 16).replace('T', ' at ')} UTC`
  const mail = renderMail({
    subject: 'Your Ringdown password was changed',
    greeting: `Hello ${user.name},`,
    paragraphs: [
      `The password of your Ringdown account (${user.email}) was changed on ${when}. Every other place where you were signed in has been signed out.`,
      'If it was you, there is nothing more to do.',
      'If it was not you, choose a new password with the link below straight away and tell an admin of your Ringdown.',
    ],
    action: { label: 'Ask for a new password', url: `${ctx.config.publicUrl}/forgot-password` },
  })
  await ctx.outbox.enqueue({ to: user.email, kind: 'password_changed', ...mail }, trx)
}
