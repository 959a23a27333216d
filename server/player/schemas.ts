import { z } from 'zod'
import { invalidToken } from '../errors'

export const trialParam = z.object({
  trialIndex: z.coerce.number().int('A whole number').min(0, 'Trials count from 0').max(100_000),
})

/** Audio refs are opaque; an unknown one is the service's 404, so any string passes here. */
export const audioRefParam = z.object({ ref: z.string() })

/**
 * A GET without a usable token is a broken link, not a form to correct: it answers
 * `invalid_token` (400) like a forged one, never a 422.
 */
export const noToken = () => invalidToken('This link has no token: open it from your invitation.')
