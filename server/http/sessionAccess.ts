import type { NextFunction, Request, RequestHandler, Response } from 'express'
import type { Knex } from 'knex'
import { maySession, type SessionAccess } from '../../shared/sessionAccess'
import { forbidden, notFound } from '../errors'

// The rule itself is shared/sessionAccess.ts: the client greys out what the server refuses.

const REFUSED: Record<SessionAccess, string> = {
  results: 'Only the developer who made this session, analysts and admins can open it',
  manage: 'Only the developer who made this session and admins can change it or reach its players',
}

/** Which session a route's `:id` names: the session itself, or an invitation of it. */
export type SessionOf = 'session' | 'invitation'

export interface SessionRule {
  access: SessionAccess
  of?: SessionOf
}

/** The owner of the session that `:id` names, or undefined when there is no such thing. */
async function ownerOf(
  knex: Knex,
  of: SessionOf,
  id: number,
): Promise<{ owner: number | null } | undefined> {
  const row: { created_by: number | null } | undefined =
    of === 'session'
      ? await knex('sessions').where({ id }).first('created_by')
      : await knex('invitations as i')
          .join('sessions as s', 's.id', 'i.session_id')
          .where('i.id', id)
          .first('s.created_by')
  return row && { owner: row.created_by }
}

/**
 * The route step that applies a rule: after the role check, before anything else reads the
 * request. A malformed `:id` is left to the route's own 422.
 */
export function sessionGuard(knex: Knex): (rule: SessionRule) => RequestHandler {
  return (rule) => (req: Request, _res: Response, next: NextFunction) => {
    const id = Number(req.params.id)
    if (!Number.isSafeInteger(id) || id <= 0 || !req.user) return next()
    const user = req.user
    const of = rule.of ?? 'session'
    ownerOf(knex, of, id).then((found) => {
      if (!found) return next(notFound(of === 'session' ? 'Session' : 'Invitation'))
      if (!maySession(user, found.owner, rule.access)) return next(forbidden(REFUSED[rule.access]))
      next()
    }, next)
  }
}
