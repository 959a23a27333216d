import { z } from 'zod'
import { LIMITS } from '../constants'
import { visibleText } from './visibleText'

export const email = z
  .string()
  .trim()
  .toLowerCase()
  .max(LIMITS.emailMax, `At most ${LIMITS.emailMax} characters`)
  .pipe(z.email('Not a valid e-mail address'))

export const personName = visibleText(
  z.string().trim().min(1, 'Required').max(LIMITS.nameMax, `At most ${LIMITS.nameMax} characters`),
)

/** An ISO calendar date (YYYY-MM-DD) that really exists. */
export const isoDate = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`)
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s
  }, 'Not a real date')

export const idParam = z.object({ id: z.coerce.number().int().positive() })
