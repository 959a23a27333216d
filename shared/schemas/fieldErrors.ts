import type { z } from 'zod'

// How a failed zod parse reads to people: by field, as forms and CSV row reports show it.

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
