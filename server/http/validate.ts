import type { z } from 'zod'
import { validationFailed } from '../errors'
import { zodFields } from '../../shared/schemas/fieldErrors'

/** Parses input at the edge; a failure becomes one 422 with every field's problem. */
export function parse<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
  const result = schema.safeParse(value ?? {})
  if (!result.success) {
    throw validationFailed('Some fields need attention', { fields: zodFields(result.error) })
  }
  return result.data
}
