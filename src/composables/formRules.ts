import type { FormItemRule } from 'naive-ui'
import type { z } from 'zod'

/** A Naive UI rule from a shared zod schema: the form refuses what the server would refuse. */
export function zodRule(schema: z.ZodType, trigger: string[] = ['blur', 'input']): FormItemRule {
  return {
    trigger,
    validator: (_rule: FormItemRule, value: unknown) => {
      const result = schema.safeParse(value)
      return result.success ? true : new Error(result.error.issues[0]?.message ?? 'Not valid')
    },
  }
}

/** Server-side field errors, shown under the matching form item. */
export function fieldFeedback(fields: Record<string, string[]> | undefined, path: string) {
  const msgs = fields?.[path]
  return msgs?.length
    ? { feedback: msgs.join('; '), validationStatus: 'error' as const }
    : { feedback: undefined, validationStatus: undefined }
}

/** Runs a Naive UI form's own validation; false means the form is showing its messages. */
export async function formIsValid(form: { validate: () => Promise<unknown> } | null) {
  if (!form) return false
  try {
    await form.validate()
    return true
  } catch {
    return false
  }
}
