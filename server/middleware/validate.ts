import type { z } from 'zod'
import { validationFailed } from '../errors'

/** Field path → messages, as the client forms show them beside each field. */
export function zodFields(error: z.ZodError): Record<string, string[]> {
  const fields: Record<string, string[]> = {}
  for (const issue of error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) (fields[key] ??= []).push('Unknown field')
      continue
    }
    // "instruments", not "instruments.0": people fix fields, not array slots.
    const path = issue.path.filter((p) => typeof p !== 'number').join('.') || '_'
    ;(fields[path] ??= []).push(issue.message)
  }
  return fields
}

export function zodMessages(error: z.ZodError): string[] {
  return Object.entries(zodFields(error)).flatMap(([path, msgs]) =>
    msgs.map((m) => (path === '_' ? m : `${path}: ${m}`)),
  )
}

/** Parses input at the edge; a failure becomes one 422 with every field's problem. */
export function parse<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
  const result = schema.safeParse(value ?? {})
  if (!result.success) {
    throw validationFailed('Some fields need attention', { fields: zodFields(result.error) })
  }
  return result.data
}
