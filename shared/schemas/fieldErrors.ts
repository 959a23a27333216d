import type { z } from 'zod'

// How a failed zod parse reads to people: by field, as forms and CSV row reports show it.

/** Field path → messages, as the client forms show them beside each field. */
export function zodFields(error: z.ZodError): Record<string, string[]> {
  // A Map, not a plain object: a field named "toString", "constructor" or "__proto__" would
  // otherwise find the object's inherited members instead of an empty slot.
  const fields = new Map<string, string[]>()
  const add = (path: string, message: string) => {
    const list = fields.get(path)
    if (list) list.push(message)
    else fields.set(path, [message])
  }
  for (const issue of error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) add(key, 'Unknown field')
      continue
    }
    // "instruments", not "instruments.0": people fix fields, not array slots.
    add(issue.path.filter((p) => typeof p !== 'number').join('.') || '_', issue.message)
  }
  // defineProperty keeps "__proto__" an ordinary own key that JSON.stringify writes out.
  const out: Record<string, string[]> = {}
  for (const [key, value] of fields)
    Object.defineProperty(out, key, { value, enumerable: true, writable: true, configurable: true })
  return out
}

export function zodMessages(error: z.ZodError): string[] {
  return Object.entries(zodFields(error)).flatMap(([path, msgs]) =>
    msgs.map((m) => (path === '_' ? m : `${path}: ${m}`)),
  )
}
