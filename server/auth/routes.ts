import { rateLimit } from 'express-rate-limit'
import type { AppContext } from '../context'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf, clearSessionCookie, setSessionCookie } from '../http/authenticate'
import { signIn, toMe } from './accounts'
import { inspectLink, setPasswordWithLink } from './links'
import { requestPasswordReset } from './passwordReset'
import { changeOwnPassword } from './changePassword'
import { endSignIn } from './signIns'
import { recordAudit } from '../audit/service'
import {
  changePasswordBody,
  forgotBody,
  linkBody,
  loginBody,
  resetBody,
} from '../../shared/schemas/auth'
import { STAFF } from '../../shared/constants'
import { AppError, unauthenticated } from '../errors'

export function authRoutes(ctx: AppContext): RouteDef[] {
  // Limits come from the config so the load benchmarks can lift them. Only failed sign-ins
  // count, so a whole office behind one address is not locked out by its own daily sign-ins;
  // guesses at one account from many addresses are held back per account (throttle.ts).
  const limit = (skipSuccessfulRequests: boolean) =>
    rateLimit({
      windowMs: ctx.config.loginRateLimit.windowMs,
      limit: ctx.config.loginRateLimit.max,
      skipSuccessfulRequests,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      handler: (_req, _res, next) =>
        next(new AppError('rate_limited', 'Too many attempts. Wait a few minutes and try again.')),
    })
  const signInLimiter = limit(true)
  const linkLimiter = limit(false)
  return [
    route({
      method: 'post',
      path: '/login',
      roles: 'public',
      before: [signInLimiter],
      body: loginBody,
      handler: async (req, res, { body }) => {
        const { user, signInId } = await signIn(ctx, body.email, body.password, req.ip ?? null)
        setSessionCookie(ctx, res, user, signInId)
        res.json({ user: toMe(user) })
      },
    }),
    route({
      method: 'post',
      path: '/logout',
      roles: 'public',
      handler: async (req, res) => {
        if (req.user && req.signInId) {
          // Ends the sign-in on the server: a copy of the cookie kept elsewhere stops too.
          await endSignIn(ctx, req.signInId)
          await recordAudit(ctx.knex, ctx.clock.now(), actorOf(req), {
            action: 'auth.sign_out',
            targetType: 'user',
            targetId: req.user.id,
          })
        }
        clearSessionCookie(ctx, res)
        res.status(204).end()
      },
    }),
    route({
      method: 'get',
      path: '/me',
      // Open to all: "nobody is signed in" is an answer the sign-in page needs, not an error.
      roles: 'public',
      handler: (req, res) => {
        res.json({
          user: req.user ? toMe(req.user) : null,
          features: { mailbox: Boolean(ctx.mailbox) && ctx.config.env !== 'production' },
        })
      },
    }),
    route({
      method: 'post',
      path: '/password',
      // No address limit: only a signed-in colleague gets here, and wrong current passwords
      // count against the account itself (throttle.ts).
      roles: STAFF,
      body: changePasswordBody,
      handler: async (req, res, { body }) => {
        if (!req.user || !req.signInId) throw unauthenticated()
        const user = await changeOwnPassword(ctx, req.user, req.signInId, body, req.ip ?? null)
        setSessionCookie(ctx, res, user, req.signInId)
        res.json({ user: toMe(user) })
      },
    }),
    route({
      method: 'post',
      path: '/forgot',
      roles: 'public',
      before: [linkLimiter],
      body: forgotBody,
      handler: async (req, res, { body }) => {
        await requestPasswordReset(ctx, body.email, actorOf(req))
        res.json({
          message: 'If that address belongs to an active account, a reset link is on its way.',
        })
      },
    }),
    route({
      // A POST, so the token travels in the body and never in an address a log keeps.
      method: 'post',
      path: '/link',
      roles: 'public',
      body: linkBody,
      handler: async (_req, res, { body }) => {
        res.json(await inspectLink(ctx, body.token))
      },
    }),
    route({
      method: 'post',
      path: '/set-password',
      roles: 'public',
      before: [linkLimiter],
      body: resetBody,
      handler: async (req, res, { body }) => {
        const { user, signInId } = await setPasswordWithLink(
          ctx,
          body.token,
          body.password,
          req.ip ?? null,
        )
        setSessionCookie(ctx, res, user, signInId)
        res.json({ user: toMe(user) })
      },
    }),
  ]
}
