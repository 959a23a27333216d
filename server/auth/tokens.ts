import jwt from 'jsonwebtoken'
import { secretKey } from './secretKey'
import type { Clock } from '../clock'

export const SESSION_COOKIE = 'rd_session'

export interface SessionClaims {
  sub: number
  /** Token version: must equal the user's current one, so deactivation revokes old cookies. */
  tv: number
  /** The sign-in record (staff_sign_ins): signing out ends it, and with it every copy. */
  sid: string
  iat: number
  exp: number
}

const seconds = (clock: Clock) => Math.floor(clock.now().getTime() / 1000)

export function signSession(
  secret: string,
  clock: Clock,
  claims: { sub: number; tv: number; sid: string },
  minutes: number,
): string {
  return jwt.sign({ ...claims, iat: seconds(clock) }, secretKey(secret), {
    algorithm: 'HS256',
    expiresIn: minutes * 60,
    audience: 'session',
  })
}

/**
 * Checks signature, audience and expiry, and that the token says when it was made and ends no
 * later than one configured lifetime after: jsonwebtoken lets a token without exp live forever,
 * and a token given a longer life than ours was not made by us.
 */
export function verifySession(
  secret: string,
  clock: Clock,
  token: string,
  maxSeconds: number,
): SessionClaims | null {
  try {
    const claims = jwt.verify(token, secretKey(secret), {
      algorithms: ['HS256'],
      audience: 'session',
      clockTimestamp: seconds(clock),
    })
    if (typeof claims !== 'object') return null
    const { sub, tv, sid, iat, exp } = claims as Record<string, unknown>
    if (typeof sub !== 'number' || typeof tv !== 'number' || typeof sid !== 'string') return null
    if (typeof iat !== 'number' || typeof exp !== 'number') return null
    if (exp - iat > maxSeconds || iat > seconds(clock) + 60) return null
    return { sub, tv, sid, iat, exp }
  } catch {
    return null
  }
}

export interface LinkClaims {
  jti: string
  sub: number
  purpose: string
}

/** Links in e-mails (set a password, reset it): signed, expiring, single use via link_tokens. */
export function signLink(
  secret: string,
  clock: Clock,
  claims: LinkClaims,
  expiresInSeconds: number,
): string {
  return jwt.sign({ ...claims, iat: seconds(clock) }, secretKey(secret), {
    algorithm: 'HS256',
    expiresIn: expiresInSeconds,
    audience: 'link',
  })
}

export function verifyLink(
  secret: string,
  clock: Clock,
  token: string,
): (LinkClaims & { exp: number }) | 'expired' | null {
  try {
    const claims = jwt.verify(token, secretKey(secret), {
      algorithms: ['HS256'],
      audience: 'link',
      clockTimestamp: seconds(clock),
    })
    if (typeof claims !== 'object' || typeof claims.jti !== 'string') return null
    return claims as unknown as LinkClaims & { exp: number }
  } catch (err) {
    return (err as Error).name === 'TokenExpiredError' ? 'expired' : null
  }
}
