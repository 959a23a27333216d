import type { NextFunction, Request, Response } from 'express'
import type { AppContext } from '../context'
import { SESSION_COOKIE, signSession, verifySession } from '../auth/tokens'
import { activeUser, type UserRow } from '../auth/accounts'
import { extendSignIn } from '../auth/signIns'
import type { Actor } from '../audit/service'

declare module 'express-serve-static-core' {
  interface Request {
    user?: UserRow
    /** The sign-in record the cookie names (staff_sign_ins), when someone is signed in. */
    signInId?: string
  }
}

export function sessionCookieOptions(ctx: AppContext) {
  return {
    httpOnly: true,
    sameSite: 'lax' as const,
    secure: ctx.config.env === 'production',
    path: '/',
    maxAge: ctx.config.sessionMinutes * 60_000,
  }
}

/** A cookie for one sign-in record; a renewal names the same record. */
export function setSessionCookie(ctx: AppContext, res: Response, user: UserRow, signInId: string) {
  const token = signSession(
    ctx.config.jwtSecret,
    ctx.clock,
    { sub: user.id, tv: user.token_version, sid: signInId },
    ctx.config.sessionMinutes,
  )
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(ctx))
}

export function clearSessionCookie(ctx: AppContext, res: Response) {
  const { maxAge: _maxAge, ...options } = sessionCookieOptions(ctx)
  res.clearCookie(SESSION_COOKIE, options)
}

/**
 * Reads the session cookie on every /api request. The user row and the sign-in record are
 * loaded each time (one read), so that signing out, a deactivated account or a changed role
 * takes effect at once, not when the cookie expires. A cookie past half its life is renewed,
 * with its record, so an active user is never signed out mid-task.
 */
export function authenticate(ctx: AppContext) {
  return async (req: Request, res: Response, next: NextFunction) => {
    const token = req.cookies?.[SESSION_COOKIE] as string | undefined
    if (!token) return next()
    const lifetime = ctx.config.sessionMinutes * 60
    const claims = verifySession(ctx.config.jwtSecret, ctx.clock, token, lifetime)
    const user = claims ? await activeUser(ctx.knex, claims, ctx.clock.now()) : null
    if (!claims || !user) {
      clearSessionCookie(ctx, res)
      return next()
    }
    req.user = user
    req.signInId = claims.sid
    const age = ctx.clock.now().getTime() / 1000 - claims.iat
    if (age > lifetime / 2) {
      await extendSignIn(ctx, claims.sid)
      setSessionCookie(ctx, res, user, claims.sid)
    }
    next()
  }
}

export function actorOf(req: Request): Actor {
  return {
    userId: req.user?.id ?? null,
    email: req.user?.email ?? null,
    name: req.user?.name ?? null,
    ip: req.ip ?? null,
  }
}
