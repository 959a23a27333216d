import type { NextFunction, Request, Response } from 'express'
import type { AppContext } from '../context'
import { SESSION_COOKIE, signSession, verifySession } from '../auth/tokens'
import { activeUser, type UserRow } from '../auth/accounts'
import type { Actor } from '../audit/service'

declare module 'express-serve-static-core' {
  interface Request {
    user?: UserRow
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

export function setSessionCookie(ctx: AppContext, res: Response, user: UserRow) {
  const token = signSession(
    ctx.config.jwtSecret,
    ctx.clock,
    user.id,
    user.token_version,
    ctx.config.sessionMinutes,
  )
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(ctx))
}

export function clearSessionCookie(ctx: AppContext, res: Response) {
  const { maxAge: _maxAge, ...options } = sessionCookieOptions(ctx)
  res.clearCookie(SESSION_COOKIE, options)
}

/**
 * Reads the session cookie on every /api request. The user row is loaded each time so that a
 * deactivated account or a changed role takes effect at once, not when the cookie expires.
 * A cookie past half its life is renewed, so an active user is never signed out mid-task.
 */
export function authenticate(ctx: AppContext) {
  return async (req: Request, res: Response, next: NextFunction) => {
    const token = req.cookies?.[SESSION_COOKIE] as string | undefined
    if (!token) return next()
    const claims = verifySession(ctx.config.jwtSecret, ctx.clock, token)
    const user = claims ? await activeUser(ctx.knex, claims.sub, claims.tv) : null
    if (!claims || !user) {
      clearSessionCookie(ctx, res)
      return next()
    }
    req.user = user
    const age = ctx.clock.now().getTime() / 1000 - claims.iat
    if (age > (ctx.config.sessionMinutes * 60) / 2) setSessionCookie(ctx, res, user)
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
