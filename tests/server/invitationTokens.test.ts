import { describe, expect, it } from 'vitest'
import jwt from 'jsonwebtoken'
import { signInvitation, verifyInvitation } from '../../server/auth/invitationTokens'
import { systemClock } from '../../server/clock'

// Invitation links are HS256 JSON Web Tokens (RFC 7519, RFC 7515 §A.1). Good links are kept once
// verified, since players send the same one with every save; what a link may do must not change
// by having been seen before.

const SECRET = 'a-test-secret-a-test-secret-a-test'
const OTHER = 'another-secret-another-secret-other'
const sign = (secret: string, sub = 7) =>
  signInvitation(secret, systemClock, { jti: 'tok-1', sub }, '2099-01-01')

describe('verifying invitation links', () => {
  it('gives the same claims the first time and every time after', () => {
    const token = sign(SECRET)
    const first = verifyInvitation(SECRET, token)
    expect(first).toMatchObject({ jti: 'tok-1', sub: 7 })
    expect(verifyInvitation(SECRET, token)).toEqual(first)
  })

  it('refuses a link once kept when the secret has changed, and takes it again under its own', () => {
    const token = sign(SECRET, 8)
    expect(verifyInvitation(SECRET, token)).not.toBeNull()
    expect(verifyInvitation(OTHER, token)).toBeNull()
    expect(verifyInvitation(SECRET, token)).not.toBeNull()
  })

  it('refuses a link whose claims were changed after signing, even beside a kept good one', () => {
    const token = sign(SECRET, 9)
    expect(verifyInvitation(SECRET, token)).not.toBeNull()
    const [head, , sig] = token.split('.')
    const body = Buffer.from(
      JSON.stringify({ ...(jwt.decode(token) as object), sub: 10 }),
    ).toString('base64url')
    expect(verifyInvitation(SECRET, `${head}.${body}.${sig}`)).toBeNull()
    // And a refused one is not kept as good by being asked about twice.
    expect(verifyInvitation(SECRET, `${head}.${body}.${sig}`)).toBeNull()
  })

  it('refuses a token made for another audience with the same secret', () => {
    const staffLike = jwt.sign({ jti: 'x', sub: 7 }, SECRET, {
      algorithm: 'HS256',
      audience: 'staff',
    })
    expect(verifyInvitation(SECRET, staffLike)).toBeNull()
  })
})
