import type { AppContext } from '../context'
import { AppError, conflict, notFound } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import { createLink, type UserRow } from '../auth/accounts'
import { renderMail } from '../mail/template'
import { ROLE_LABELS } from '../../shared/constants'
import type { InviteUserBody, StaffUser, UpdateUserBody } from '../../shared/schemas/users'

const toStaff = (u: UserRow): StaffUser => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role as StaffUser['role'],
  status: u.status,
  createdAt: u.created_at,
  lastLoginAt: u.last_login_at,
})

export async function listStaff(ctx: AppContext): Promise<StaffUser[]> {
  const rows: UserRow[] = await ctx.knex('users').whereNot({ role: 'player' }).orderBy('name')
  return rows.map(toStaff)
}

async function sendInvite(ctx: AppContext, user: UserRow, invitedBy: string, trx = ctx.knex) {
  const url = await createLink(ctx, trx, user.id, 'invite')
  const mail = renderMail({
    subject: 'You are invited to Ringdown',
    greeting: `Hello ${user.name},`,
    paragraphs: [
      `${invitedBy} has given you a Ringdown account as ${ROLE_LABELS[user.role].toLowerCase()}.`,
      'Choose your password with the link below to sign in. The link works once and for seven days.',
    ],
    action: { label: 'Choose your password', url },
  })
  await ctx.outbox.enqueue({ to: user.email, kind: 'staff_invite', ...mail }, trx)
}

export async function inviteStaff(
  ctx: AppContext,
  body: InviteUserBody,
  actor: Actor,
): Promise<StaffUser> {
  const now = ctx.clock.now().toISOString()
  const user = await ctx.knex.transaction(async (trx) => {
    const existing = await trx('users').where({ email: body.email }).first()
    if (existing)
      throw conflict('There is already an account with this e-mail', {
        email: ['Already in use'],
      })
    const [id] = await trx('users').insert({
      email: body.email,
      name: body.name,
      role: body.role,
      status: 'invited',
      created_at: now,
      updated_at: now,
    })
    const row: UserRow = await trx('users').where({ id }).first()
    await sendInvite(ctx, row, actor.name ?? actor.email ?? 'An admin', trx)
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'staff.invited',
      targetType: 'user',
      targetId: id,
      details: { role: body.role },
    })
    return row
  })
  void ctx.outbox.deliverDue()
  return toStaff(user)
}

export async function resendStaffInvite(ctx: AppContext, id: number, actor: Actor) {
  const user: UserRow | undefined = await ctx.knex('users').where({ id }).first()
  if (!user || user.role === 'player') throw notFound('Account')
  if (user.status !== 'invited')
    throw conflict('This account has already chosen a password; use a password reset instead')
  await ctx.knex.transaction(async (trx) => {
    await sendInvite(ctx, user, actor.name ?? actor.email ?? 'An admin', trx)
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: 'staff.invite_resent',
      targetType: 'user',
      targetId: id,
    })
  })
  void ctx.outbox.deliverDue()
}

export async function updateStaff(
  ctx: AppContext,
  id: number,
  body: UpdateUserBody,
  actor: Actor,
): Promise<StaffUser> {
  const updated = await ctx.knex.transaction(async (trx) => {
    const user: UserRow | undefined = await trx('users').where({ id }).first()
    if (!user || user.role === 'player') throw notFound('Account')
    const self = actor.userId === id
    if (self && body.status === 'deactivated')
      throw new AppError('conflict', 'You cannot deactivate your own account')
    if (self && body.role && body.role !== user.role)
      throw new AppError('conflict', 'You cannot change your own role')
    // Never leave the platform without an active admin.
    const losesAdmin =
      user.role === 'admin' &&
      user.status === 'active' &&
      ((body.role && body.role !== 'admin') || body.status === 'deactivated')
    if (losesAdmin) {
      const [{ n }] = (await trx('users')
        .where({ role: 'admin', status: 'active' })
        .count({ n: '*' })) as { n: number }[]
      if (Number(n) <= 1) throw new AppError('conflict', 'At least one active admin must remain')
    }
    const changes: Record<string, unknown> = {}
    if (body.name !== undefined && body.name !== user.name) changes.name = body.name
    if (body.role !== undefined && body.role !== user.role) changes.role = body.role
    if (body.status !== undefined) {
      if (body.status === 'deactivated' && user.status !== 'deactivated')
        changes.status = 'deactivated'
      if (body.status === 'active' && user.status === 'deactivated')
        // Back to "invited" when no password was ever chosen.
        changes.status = user.password_hash ? 'active' : 'invited'
    }
    if (Object.keys(changes).length === 0) return user
    await trx('users')
      .where({ id })
      .update({
        ...changes,
        // A role change or deactivation ends every open session of that account.
        token_version: user.token_version + 1,
        updated_at: ctx.clock.now().toISOString(),
      })
    await recordAudit(trx, ctx.clock.now(), actor, {
      action: changes.status === 'deactivated' ? 'staff.deactivated' : 'staff.updated',
      targetType: 'user',
      targetId: id,
      // Who changed what: the account is the target; an address itself is not repeated here.
      details: {
        changes: Object.fromEntries(
          Object.entries(changes).map(([k, v]) => [
            k,
            k === 'email'
              ? 'changed'
              : { from: (user as unknown as Record<string, unknown>)[k], to: v },
          ]),
        ),
      },
    })
    return (await trx('users').where({ id }).first()) as UserRow
  })
  return toStaff(updated)
}
