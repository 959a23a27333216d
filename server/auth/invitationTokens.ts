import jwt from 'jsonwebtoken'
import { secretKey } from './secretKey'
import type { Clock } from '../clock'

const AUDIENCE = 'invitation'

export interface InvitationClaims {
  /** The invitation's stored token id: rotating or clearing it revokes every link sent. */
  jti: string
  /** The invitation id, so a link cannot be moved to another player's invitation. */
  sub: number
  exp: number
}

const seconds = (clock: Clock) => Math.floor(clock.now().getTime() / 1000)

/** The first second after the deadline day (UTC): the link works through the whole day. */
export function deadlineEnd(deadline: string): Date {
  return new Date(Date.parse(`${deadline}T00:00:00Z`) + 24 * 60 * 60 * 1000)
}

export function signInvitation(
  secret: string,
  clock: Clock,
  claims: { jti: string; sub: number },
  deadline: string,
): string {
  return jwt.sign(
    {
      jti: claims.jti,
      sub: claims.sub,
      iat: seconds(clock),
      exp: deadlineEnd(deadline).getTime() / 1000,
    },
    secretKey(secret),
    { algorithm: 'HS256', audience: AUDIENCE },
  )
}

/**
 * Checks signature and audience. The expiry in the token is left to the caller, which holds
 * the link against the session's current deadline: a deadline moved later keeps earlier links
 * working, one moved earlier ends them, and an unchanged one ends them at the token's exp.
 */
export function verifyInvitation(secret: string, token: string): InvitationClaims | null {
  if (secret !== verifiedUnder) {
    verified.clear()
    verifiedUnder = secret
  }
  const known = verified.get(token)
  if (known) return known
  const claims = checkSignature(secret, token)
  if (claims) {
    verified.set(token, claims)
    if (verified.size > VERIFIED_KEPT) verified.delete(verified.keys().next().value!)
  }
  return claims
}

// Checking the signature costs more than the rest of an answer save's checks together, and a
// player sends the same link with every save. Under one secret a given string always verifies
// the same way (the claims are read from it, and revocation is the stored token id, checked by
// the caller every time), so good links are kept; bad ones are not, so junk cannot crowd out.
const VERIFIED_KEPT = 5000
const verified = new Map<string, InvitationClaims>()
let verifiedUnder = ''

function checkSignature(secret: string, token: string): InvitationClaims | null {
  try {
    const claims = jwt.verify(token, secretKey(secret), {
      algorithms: ['HS256'],
      audience: AUDIENCE,
      ignoreExpiration: true,
    })
    if (typeof claims !== 'object' || typeof claims.jti !== 'string') return null
    if (typeof claims.sub !== 'number' || typeof claims.exp !== 'number') return null
    const { jti, sub, exp } = claims as unknown as InvitationClaims
    return { jti, sub, exp }
  } catch {
    return null
  }
}
